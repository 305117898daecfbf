package dev.bracket.alerts;

import dev.bracket.bands.ConfidenceBand;
import dev.bracket.bounds.IdentifiedInterval;

import java.util.LinkedHashMap;
import java.util.Map;

/**
 * Fires when the confidence band is narrower than a configured width (in outcome units). The band
 * is judged, not the identified interval: the interval's width is fixed by the assumptions, while
 * the band narrows toward it as data accrue.
 *
 * @param width       the band must be strictly narrower than this
 * @param clearMargin a firing alert resolves at once when the band is at least {@code width + clearMargin}
 *                    wide; 0 disables the margin
 */
public record IntervalNarrowRule(double width, double clearMargin) implements RowRule {

    public IntervalNarrowRule {
        if (!(width > 0) || Double.isInfinite(width)) {
            throw new IllegalArgumentException("interval-narrow width must be a finite number > 0, was " + width);
        }
        if (!(clearMargin >= 0) || Double.isInfinite(clearMargin)) {
            throw new IllegalArgumentException("interval-narrow clear-margin must be a finite number >= 0, was " + clearMargin);
        }
    }

    @Override
    public AlertRule rule() {
        return AlertRule.INTERVAL_NARROW;
    }

    @Override
    public Verdict judge(IdentifiedInterval interval, ConfidenceBand band) {
        String seen = AlertText.band(band);
        if (band.isRefuted()) {
            return Verdict.unmet(seen + ": the assumptions contradict the data");
        }
        String widths = "width " + AlertText.num(band.width()) + ", limit " + AlertText.num(width);
        if (band.width() < width) {
            return Verdict.met("", seen + ", " + widths);
        }
        if (clearMargin > 0 && band.width() >= width + clearMargin) {
            return Verdict.clear(seen + ", " + widths + ", beyond the clear margin " + AlertText.num(clearMargin));
        }
        return Verdict.unmet(seen + ", " + widths);
    }

    @Override
    public Map<String, Double> limits() {
        Map<String, Double> m = new LinkedHashMap<>();
        m.put("width", width);
        m.put("clearMargin", clearMargin);
        return m;
    }
}
