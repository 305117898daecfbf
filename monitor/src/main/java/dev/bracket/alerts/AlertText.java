package dev.bracket.alerts;

import dev.bracket.bands.ConfidenceBand;

import java.time.Duration;
import java.util.Locale;

/** How numbers, bands and durations are written in alert sentences. */
public final class AlertText {

    private AlertText() {
    }

    /** Four significant digits: enough to see why a threshold was crossed, short enough to read. */
    static String num(double v) {
        return String.format(Locale.ROOT, "%.4g", v);
    }

    /** E.g. {@code anytime 95% band [0.1234, 0.5678]}, or {@code anytime 95% band (refuted)}. */
    static String band(ConfidenceBand b) {
        String name = b.method().id() + " " + num(100 * b.level()).replaceAll("\\.?0+$", "") + "% band";
        return b.isBounded()
                ? String.format(Locale.ROOT, "%s [%s, %s]", name, num(b.lower()), num(b.upper()))
                : name + " (" + b.status().id() + ")";
    }

    /** A duration as people say it, e.g. {@code 5m 30s}. */
    public static String duration(Duration d) {
        long s = d.toSeconds();
        if (s == 0) {
            return d.toMillis() + "ms";
        }
        StringBuilder out = new StringBuilder();
        if (s >= 3600) {
            out.append(s / 3600).append("h ");
        }
        if (s % 3600 >= 60) {
            out.append(s % 3600 / 60).append("m ");
        }
        if (s % 60 > 0) {
            out.append(s % 60).append("s ");
        }
        return out.toString().trim();
    }
}
