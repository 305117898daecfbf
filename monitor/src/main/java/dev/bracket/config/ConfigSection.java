package dev.bracket.config;

import java.util.ArrayList;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Set;

/**
 * The keys of one mapping of the configuration (the top level, a study, an outcome, ...), in the
 * order they are defined. Defining a key here is what makes the mapping allow it.
 */
final class ConfigSection {

    private final List<ConfigKey<?>> keys = new ArrayList<>();

    /** A key that may be absent; {@code fallback} is its default ({@code null}: computed by the reader). */
    <T> ConfigKey<T> key(String name, ConfigKey.Type<T> type, T fallback, ConfigKey.Check<T> check, String doc) {
        return add(new ConfigKey<>(name, type, false, fallback, check, doc));
    }

    <T> ConfigKey<T> key(String name, ConfigKey.Type<T> type, T fallback, String doc) {
        return key(name, type, fallback, ConfigKey.Check.none(), doc);
    }

    /** A key that must be given. */
    <T> ConfigKey<T> required(String name, ConfigKey.Type<T> type, ConfigKey.Check<T> check, String doc) {
        return add(new ConfigKey<>(name, type, true, null, check, doc));
    }

    <T> ConfigKey<T> required(String name, ConfigKey.Type<T> type, String doc) {
        return required(name, type, ConfigKey.Check.none(), doc);
    }

    List<ConfigKey<?>> keys() {
        return List.copyOf(keys);
    }

    Set<String> names() {
        Set<String> out = new LinkedHashSet<>();
        keys.forEach(k -> out.add(k.name()));
        return out;
    }

    /** Refuses keys of {@code node} that this section does not define. */
    ConfigNode check(ConfigNode node) {
        return node.onlyKeys(names());
    }

    private <T> ConfigKey<T> add(ConfigKey<T> key) {
        if (names().contains(key.name())) {
            throw new IllegalStateException("configuration key '" + key.name() + "' is defined twice in one section");
        }
        keys.add(key);
        return key;
    }
}
