package dev.bracket.config;

import java.time.Duration;
import java.util.function.Function;

/**
 * One configuration key, defined once: its name, the type of its value with the default used
 * when the key is absent, the check of a given value, and one line saying what it means. Keys
 * are defined in {@link ConfigKeys}; the readers read every value through them, and the keys a
 * mapping allows are the keys of its {@link ConfigSection}.
 *
 * @param fallback the value when the key is absent; {@code null} when it is required, or when the
 *                 reader computes the default from other keys or the environment
 */
record ConfigKey<T>(String name, Type<T> type, boolean required, T fallback, Check<T> check, String doc) {

    /** The value at this key of {@code parent}, its default when absent; a broken value fails there. */
    T read(ConfigNode parent) {
        ConfigNode node = node(parent);
        if (required && node.isMissing()) {
            throw parent.fail("needs the key '" + name + "'");
        }
        T value = type.read(node, fallback);
        String broken = value == null ? null : check.broken(value);
        if (broken != null) {
            throw node.fail(broken);
        }
        return value;
    }

    /** The node at this key of {@code parent}, for rules that join several keys. */
    ConfigNode node(ConfigNode parent) {
        return parent.get(name);
    }

    /**
     * What a key holds and how it is read; {@code keys} are the keys of a nested mapping (or of
     * each mapping in a list), {@code null} for a plain value or an open mapping.
     */
    record Type<T>(Reader<T> reader, ConfigSection keys) {

        static final Type<String> TEXT = new Type<>(ConfigNode::text, null);
        static final Type<Double> NUMBER = new Type<>((n, f) -> n.isMissing() ? f : n.number(), null);
        static final Type<Long> WHOLE = new Type<>(ConfigNode::positiveLong, null);
        static final Type<Duration> DURATION = new Type<>(ConfigNode::duration, null);
        /** A list of free-form items (e.g. assumption sets), or a mapping passed on verbatim. */
        static final Type<ConfigNode> FREE = new Type<>((n, f) -> n, null);

        /** A word read by {@code parse}; its complaint becomes an error at the value. */
        static <T> Type<T> choice(Function<String, T> parse) {
            return new Type<>((n, f) -> {
                if (n.isMissing()) {
                    return f;
                }
                try {
                    return parse.apply(n.text());
                } catch (IllegalArgumentException e) {
                    throw n.fail(e.getMessage());
                }
            }, null);
        }

        /** A mapping with the keys of {@code keys}; any other key is refused. */
        static Type<ConfigNode> mapping(ConfigSection keys) {
            return new Type<>((n, f) -> n.onlyKeys(keys.names()), keys);
        }

        /** A list of mappings with the keys of {@code keys}, each checked by its reader in turn. */
        static Type<ConfigNode> list(ConfigSection keys) {
            return new Type<>((n, f) -> n, keys);
        }

        /** A mapping whose keys name its entries (alert rules); the reader checks the names. */
        static Type<ConfigNode> named(ConfigSection keys) {
            return new Type<>((n, f) -> n, keys);
        }

        T read(ConfigNode node, T fallback) {
            return reader.read(node, fallback);
        }
    }

    /** Reads a node, or returns the fallback when it is absent. */
    @FunctionalInterface
    interface Reader<T> {
        T read(ConfigNode node, T fallback);
    }

    /** A rule on a value: what is wrong with it, in the words of an error message, or {@code null}. */
    @FunctionalInterface
    interface Check<T> {
        String broken(T value);

        static <T> Check<T> none() {
            return value -> null;
        }

        static Check<Long> atMost(long max) {
            return value -> value > max ? "must be at most " + max : null;
        }

        static Check<Duration> positive() {
            return value -> value.isNegative() || value.isZero() ? "must be longer than zero" : null;
        }
    }
}
