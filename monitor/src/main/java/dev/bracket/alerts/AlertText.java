package dev.bracket.alerts;

import java.time.Duration;
import java.util.Locale;

/** How numbers, bands and durations are written in alert sentences. */
final class AlertText {

    private AlertText() {
    }

    /** Four significant digits: enough to see why a threshold was crossed, short enough to read. */
    static String num(double v) {
        return String.format(Locale.ROOT, "%.4g", v);
    }

    static String band(BandReading b) {
        return String.format(Locale.ROOT, "%s %s%% band [%s, %s]", b.method().id(),
                num(100 * b.level()).replaceAll("\\.?0+$", ""), num(b.lower()), num(b.upper()));
    }

    /** A duration as people say it, e.g. {@code 5m 30s}. */
    static String duration(Duration d) {
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
