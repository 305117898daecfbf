package dev.bracket.alerts;

import java.util.Locale;

/** The two transitions of an alert: it starts firing, or it resolves. */
public enum TransitionKind {
    FIRING("firing"),
    RESOLVED("resolved");

    private final String id;

    TransitionKind(String id) {
        this.id = id;
    }

    public String id() {
        return id;
    }

    public static TransitionKind fromId(String id) {
        String key = id == null ? "" : id.trim().toLowerCase(Locale.ROOT);
        for (TransitionKind k : values()) {
            if (k.id.equals(key)) {
                return k;
            }
        }
        throw new IllegalArgumentException("unknown alert state '" + id + "'; known: firing, resolved");
    }
}
