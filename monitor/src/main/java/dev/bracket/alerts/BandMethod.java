package dev.bracket.alerts;

import java.util.Locale;

/** Which confidence band an alert rule reads. */
public enum BandMethod {
    /**
     * Confidence sequence valid at every look (Howard et al. 2021; Waudby-Smith &amp; Ramdas 2024):
     * the default, because alerts look at the band after every update.
     */
    ANYTIME_VALID("anytime-valid"),
    /** Imbens &amp; Manski (2004) interval: valid at one pre-planned look, not under continuous monitoring. */
    FIXED_HORIZON("fixed-horizon");

    private final String id;

    BandMethod(String id) {
        this.id = id;
    }

    public String id() {
        return id;
    }

    public static BandMethod fromId(String id) {
        String key = id == null ? "" : id.trim().toLowerCase(Locale.ROOT);
        for (BandMethod m : values()) {
            if (m.id.equals(key)) {
                return m;
            }
        }
        throw new IllegalArgumentException("unknown band method '" + id + "'; known: anytime-valid, fixed-horizon");
    }
}
