package dev.bracket.bounds;

import java.util.Locale;

/** Which end of the outcome range is the better outcome; optimizing selection and sorting on gains depend on it. */
public enum Direction {
    HIGHER("higher"),
    LOWER("lower");

    private final String id;

    Direction(String id) {
        this.id = id;
    }

    /** The identifier used on the command line and in configuration: {@code higher} or {@code lower}. */
    public String id() {
        return id;
    }

    /** Parses {@code higher} or {@code lower} (case-insensitive). */
    public static Direction parse(String text) {
        String t = text == null ? "" : text.trim().toLowerCase(Locale.ROOT);
        for (Direction d : values()) {
            if (d.id.equals(t)) {
                return d;
            }
        }
        throw new IllegalArgumentException("must be 'higher' or 'lower', was '" + text + "'");
    }
}
