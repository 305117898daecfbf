package dev.bracket.bands;

import java.util.Locale;

/** The two kinds of confidence band Bracket puts around an identified interval. */
public enum BandMethod {
    /**
     * Valid at one pre-planned look: Imbens &amp; Manski (2004) with Stoye's (2009) care for short
     * intervals. Looking again and again at a growing stream inflates its error rate.
     */
    FIXED_HORIZON("fixed-horizon"),
    /**
     * Valid however often and whenever the stream is looked at: time-uniform confidence sequences
     * (Howard, Ramdas, McAuliffe &amp; Sekhon 2021). The basis for alerts.
     */
    ANYTIME("anytime");

    private final String id;

    BandMethod(String id) {
        this.id = id;
    }

    /** The identifier used in JSON output and on the command line. */
    public String id() {
        return id;
    }

    /** Parses {@code fixed-horizon} (or {@code fixed}) and {@code anytime}, case-insensitive. */
    public static BandMethod parse(String text) {
        String t = text == null ? "" : text.trim().toLowerCase(Locale.ROOT);
        return switch (t) {
            case "fixed", "fixed-horizon" -> FIXED_HORIZON;
            case "anytime" -> ANYTIME;
            default -> throw new IllegalArgumentException("unknown band '" + text + "'; known: fixed, anytime");
        };
    }
}
