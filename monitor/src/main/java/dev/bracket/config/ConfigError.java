package dev.bracket.config;

/**
 * An unusable configuration: the message names the file, line and column and the rule that was
 * broken, e.g. {@code bracket.yaml:4:14: studies[0].outcome.min must be a number}. Thrown at
 * start, before anything connects to Kafka.
 */
public final class ConfigError extends RuntimeException {

    public ConfigError(String message) {
        super(message);
    }

    public ConfigError(String message, Throwable cause) {
        super(message, cause);
    }
}
