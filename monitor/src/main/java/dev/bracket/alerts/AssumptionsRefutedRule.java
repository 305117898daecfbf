package dev.bracket.alerts;

import dev.bracket.bounds.IdentifiedInterval;

import java.util.LinkedHashMap;
import java.util.Map;

/**
 * Fires when the band for the interval's lower end lies wholly above the band for its upper end:
 * the assumptions' constraints cannot all hold, and sampling error does not explain it. A
 * refuted point estimate alone does not fire (it can be noise); {@link BandReading#inverted()} is
 * the test.
 *
 * @param clearMargin a firing alert resolves at once when the band is upright with at least this
 *                    width; 0 disables the margin
 */
public record AssumptionsRefutedRule(double clearMargin) implements CellRule {

    public AssumptionsRefutedRule {
        if (!(clearMargin >= 0) || Double.isInfinite(clearMargin)) {
            throw new IllegalArgumentException("assumptions-refuted clear-margin must be a finite number >= 0, was " + clearMargin);
        }
    }

    @Override
    public AlertRule rule() {
        return AlertRule.ASSUMPTIONS_REFUTED;
    }

    @Override
    public Verdict judge(IdentifiedInterval interval, BandReading band) {
        if (band.inverted()) {
            return Verdict.met("", "the lower end's lower confidence limit " + AlertText.num(band.lower())
                    + " lies above the upper end's upper confidence limit " + AlertText.num(band.upper())
                    + " (" + band.method().id() + ", level " + AlertText.num(band.level()) + ")");
        }
        String seen = AlertText.band(band);
        if (clearMargin > 0 && band.width() >= clearMargin) {
            return Verdict.clear(seen + " is upright with width at least the clear margin " + AlertText.num(clearMargin));
        }
        return Verdict.unmet(seen + " is upright");
    }

    @Override
    public Map<String, Double> limits() {
        Map<String, Double> m = new LinkedHashMap<>();
        m.put("clearMargin", clearMargin);
        return m;
    }
}
