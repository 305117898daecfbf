package dev.bracket.config;

import com.fasterxml.jackson.core.JsonPointer;
import com.fasterxml.jackson.databind.JsonNode;
import dev.bracket.duration.DurationText;

import java.time.Duration;
import java.util.ArrayList;
import java.util.Iterator;
import java.util.List;
import java.util.Set;

/**
 * One node of the configuration with its place in the file. Typed accessors check the rule for
 * a value and throw {@link ConfigError} naming file, line, column and the dotted path.
 */
final class ConfigNode {



    private final YamlDocument doc;
    private final JsonNode node;
    private final JsonPointer pointer;

    ConfigNode(YamlDocument doc, JsonNode node, JsonPointer pointer) {
        this.doc = doc;
        this.node = node;
        this.pointer = pointer;
    }

    boolean isMissing() {
        return node.isMissingNode() || node.isNull();
    }

    /** The dotted path for messages, e.g. {@code studies[0].outcome.min}. */
    String path() {
        return pathOf(pointer);
    }

    /** The dotted path of {@code pointer}, e.g. {@code studies[0].outcome.min}. */
    static String pathOf(JsonPointer pointer) {
        StringBuilder out = new StringBuilder();
        for (JsonPointer p = pointer; p.getMatchingProperty() != null; p = p.tail()) {
            if (p.getMatchingIndex() >= 0 && !out.isEmpty()) {
                out.append('[').append(p.getMatchingIndex()).append(']');
            } else {
                if (!out.isEmpty()) {
                    out.append('.');
                }
                out.append(p.getMatchingProperty());
            }
        }
        return out.isEmpty() ? "the top level" : out.toString();
    }

    /** An error located at this node (or at its parent's key when the node is missing). */
    ConfigError fail(String rule) {
        String where = isMissing() ? doc.locate(pointer.head(), false) : doc.locate(pointer, false);
        return new ConfigError(where + ": " + path() + " " + rule);
    }

    ConfigNode get(String key) {
        JsonNode child = node.isObject() ? node.path(key) : com.fasterxml.jackson.databind.node.MissingNode.getInstance();
        return new ConfigNode(doc, child, pointer.appendProperty(key));
    }

    ConfigNode require(String key) {
        ConfigNode child = get(key);
        if (child.isMissing()) {
            throw fail("needs the key '" + key + "'");
        }
        return child;
    }

    /** Rejects keys outside {@code allowed}, so that a typo does not silently fall back to a default. */
    ConfigNode onlyKeys(Set<String> allowed) {
        if (isMissing()) {
            return this;
        }
        if (!node.isObject()) {
            throw fail("must be a mapping with the keys " + String.join(", ", new java.util.TreeSet<>(allowed)));
        }
        for (Iterator<String> it = node.fieldNames(); it.hasNext(); ) {
            String k = it.next();
            if (!allowed.contains(k)) {
                JsonPointer at = pointer.appendProperty(k);
                throw new ConfigError(doc.locate(at, true) + ": unknown key '" + k + "' in " + path()
                        + "; allowed: " + String.join(", ", new java.util.TreeSet<>(allowed)));
            }
        }
        return this;
    }

    boolean isObject() {
        return node.isObject();
    }

    boolean isArray() {
        return node.isArray();
    }

    List<ConfigNode> elements() {
        if (isMissing()) {
            return List.of();
        }
        if (!node.isArray()) {
            throw fail("must be a list");
        }
        List<ConfigNode> out = new ArrayList<>();
        for (int i = 0; i < node.size(); i++) {
            out.add(new ConfigNode(doc, node.get(i), pointer.appendIndex(i)));
        }
        return out;
    }

    List<String> keys() {
        List<String> out = new ArrayList<>();
        node.fieldNames().forEachRemaining(out::add);
        return out;
    }

    String text() {
        if (!node.isValueNode() || node.isNull()) {
            throw fail("must be a plain value");
        }
        String s = node.asText();
        if (s.isBlank()) {
            throw fail("must not be empty");
        }
        return s;
    }

    String text(String fallback) {
        return isMissing() ? fallback : text();
    }

    double number() {
        if (!node.isNumber()) {
            throw fail("must be a number, was '" + node.asText() + "'");
        }
        double v = node.asDouble();
        if (!Double.isFinite(v)) {
            throw fail("must be a finite number");
        }
        return v;
    }

    long positiveLong(long fallback) {
        if (isMissing()) {
            return fallback;
        }
        if (!node.canConvertToLong() || !node.isIntegralNumber() || node.asLong() <= 0) {
            throw fail("must be a whole number > 0, was '" + node.asText() + "'");
        }
        return node.asLong();
    }

    /** A duration in the grammar of {@link DurationText}, e.g. {@code 500ms}, {@code 5m} or {@code PT1H}. */
    Duration duration(Duration fallback) {
        if (isMissing()) {
            return fallback;
        }
        try {
            return DurationText.parse(text());
        } catch (IllegalArgumentException e) {
            throw fail(e.getMessage());
        }
    }
}
