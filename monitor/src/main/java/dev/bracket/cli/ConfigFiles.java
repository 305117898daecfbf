package dev.bracket.cli;

import dev.bracket.config.BracketConfig;
import dev.bracket.config.ConfigError;

import java.nio.file.Path;

/** Loads a configuration for a command, turning a {@link ConfigError} into an {@link InputError} (exit code 2). */
final class ConfigFiles {

    private ConfigFiles() {
    }

    static BracketConfig load(Path file) {
        try {
            return BracketConfig.load(file);
        } catch (ConfigError e) {
            throw new InputError(e.getMessage(), e);
        }
    }
}
