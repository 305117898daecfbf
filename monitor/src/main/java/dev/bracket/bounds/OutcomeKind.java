package dev.bracket.bounds;

import java.util.Locale;

/**
 * What values the outcome can take inside its declared range [min, max]. A modelling declaration
 * made per study, like the range itself: it is checked on every event, never estimated.
 */
public enum OutcomeKind {
    /** Any value in [min, max] (a share, a latency, a score). */
    BOUNDED("bounded"),
    /**
     * Only the two ends: every outcome equals min or max (converted or not, died or survived, the
     * service level objective met or missed). Needed for the sharp bounds under an independent
     * instrument, which work on the joint law of the binary potential outcomes.
     */
    BINARY("binary");

    private final String id;

    OutcomeKind(String id) {
        this.id = id;
    }

    /** The identifier used on the command line, in configuration and in JSON. */
    public String id() {
        return id;
    }

    /** Parses {@code bounded} or {@code binary} (case-insensitive). */
    public static OutcomeKind parse(String text) {
        String t = text == null ? "" : text.trim().toLowerCase(Locale.ROOT);
        for (OutcomeKind k : values()) {
            if (k.id.equals(t)) {
                return k;
            }
        }
        throw new IllegalArgumentException("must be 'bounded' or 'binary', was '" + text + "'");
    }
}
