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
 * @param clearExtraWidth a firing alert resolves at once when the band is at least {@code width + clearExtraWidth}
 *                    wide; 0 disables the margin
 */
public record IntervalNarrowRule(double width, double clearExtraWidth) implements RowRule {

    public IntervalNarrowRule {
        if (!(width > 0) || Double.isInfinite(width)) {
            throw new IllegalArgumentException("interval-narrow width must be a finite number > 0, was " + width);
        }
        if (!(clearExtraWidth >= 0) || Double.isInfinite(clearExtraWidth)) {
            throw new IllegalArgumentException("interval-narrow clear-extra-width must be a finite number >= 0, was " + clearExtraWidth);
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
        if (clearExtraWidth > 0 && band.width() >= width + clearExtraWidth) {
            return Verdict.clear(seen + ", " + widths + ", beyond clear-extra-width " + AlertText.num(clearExtraWidth));
        }
        return Verdict.unmet(seen + ", " + widths);
    }

    @Override
    public Map<String, Double> limits() {
        Map<String, Double> m = new LinkedHashMap<>();
        m.put("width", width);
        m.put("clearExtraWidth", clearExtraWidth);
        return m;
    }
}
