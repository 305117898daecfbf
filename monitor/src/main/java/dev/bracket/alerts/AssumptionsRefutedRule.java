package dev.bracket.alerts;

import dev.bracket.bands.ConfidenceBand;
import dev.bracket.bounds.IdentifiedInterval;

import java.util.LinkedHashMap;
import java.util.Map;

/**
 * Fires when the confidence band is refuted: no treated share and arm means inside their
 * confidence region are compatible with the assumptions, which for an interval {@code [0, mu1 - mu0]}
 * is exactly "the band for the lower end lies wholly above the band for the upper end" (see
 * {@link ConfidenceBand}). Sampling error does not explain the contradiction. A refuted point
 * estimate alone does not fire: it can be noise.
 *
 * @param clearMinWidth a firing alert resolves at once when the band exists again with at least this
 *                    width; 0 disables the margin
 */
public record AssumptionsRefutedRule(double clearMinWidth) implements RowRule {

    public AssumptionsRefutedRule {
        if (!(clearMinWidth >= 0) || Double.isInfinite(clearMinWidth)) {
            throw new IllegalArgumentException("assumptions-refuted clear-min-width must be a finite number >= 0, was " + clearMinWidth);
        }
    }

    @Override
    public AlertRule rule() {
        return AlertRule.ASSUMPTIONS_REFUTED;
    }

    @Override
    public Verdict judge(IdentifiedInterval interval, ConfidenceBand band) {
        String seen = AlertText.band(band);
        if (band.isRefuted()) {
            return Verdict.met("", seen + ": no treated share and arm means in the confidence region satisfy the assumptions"
                    + (interval.isBounded() ? "" : ", and the estimate is refuted too"));
        }
        if (clearMinWidth > 0 && band.width() >= clearMinWidth) {
            return Verdict.clear(seen + " exists, with width at least clear-min-width " + AlertText.num(clearMinWidth));
        }
        return Verdict.unmet(seen + " exists: the contradiction is within sampling error");
    }

    @Override
    public Map<String, Double> limits() {
        Map<String, Double> m = new LinkedHashMap<>();
        m.put("clearMinWidth", clearMinWidth);
        return m;
    }
}
