package dev.bracket.alerts;

import dev.bracket.bounds.AssumptionSet;

/**
 * What one alert is about: study × assumption set × window × rule. Its text form
 * {@code study/assumptions/window/rule} (assumptions as canonical comma-separated identifiers) is
 * the alerts topic's record key and the unit of ordering for every sink.
 */
public record AlertKey(String study, String assumptions, String window, AlertRule rule) {

    /** Stands for "every assumption set" and "every window" in the keys of per-study rules. */
    public static final String ANY = "*";

    public AlertKey {
        requirePart(study, "study");
        requirePart(assumptions, "assumption set");
        requirePart(window, "window");
        if (rule == null) {
            throw new IllegalArgumentException("alert key needs a rule");
        }
    }

    public static AlertKey perRow(String study, AssumptionSet assumptions, String window, AlertRule rule) {
        return new AlertKey(study, assumptions.toString(), window, rule);
    }

    public static AlertKey perStudy(String study, AlertRule rule) {
        return new AlertKey(study, ANY, ANY, rule);
    }

    /** Parses the text form; the inverse of {@link #toString()}. */
    public static AlertKey parse(String text) {
        String[] parts = text == null ? new String[0] : text.split("/", -1);
        if (parts.length != 4) {
            throw new IllegalArgumentException("alert key must be study/assumptions/window/rule, was '" + text + "'");
        }
        return new AlertKey(parts[0], parts[1], parts[2], AlertRule.fromId(parts[3]));
    }

    private static void requirePart(String value, String what) {
        if (value == null || value.isEmpty() || value.contains("/")) {
            throw new IllegalArgumentException("alert key " + what + " must be non-empty and contain no '/', was '" + value + "'");
        }
    }

    @Override
    public String toString() {
        return study + "/" + assumptions + "/" + window + "/" + rule.id();
    }
}
