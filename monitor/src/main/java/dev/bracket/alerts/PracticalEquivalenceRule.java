package dev.bracket.alerts;

import dev.bracket.bands.ConfidenceBand;
import dev.bracket.bounds.IdentifiedInterval;

import java.util.LinkedHashMap;
import java.util.Map;

/**
 * Fires when the estimated identified interval and its confidence band both lie wholly inside a
 * configured range of practical equivalence [low, high]: whatever the truth within the
 * assumptions, the effect is too small to matter by the study's own declaration.
 *
 * @param low         lower end of the range of practical equivalence
 * @param high        upper end
 * @param clearOutsideBy a firing alert resolves at once when the band reaches beyond the range by at
 *                    least this much; 0 disables the margin
 */
public record PracticalEquivalenceRule(double low, double high, double clearOutsideBy) implements RowRule {

    public PracticalEquivalenceRule {
        if (!Double.isFinite(low) || !Double.isFinite(high) || !(low < high)) {
            throw new IllegalArgumentException("practical-equivalence needs finite lower < upper, was [" + low + ", " + high + "]");
        }
        if (!(clearOutsideBy >= 0) || Double.isInfinite(clearOutsideBy)) {
            throw new IllegalArgumentException("practical-equivalence clear-outside-by must be a finite number >= 0, was " + clearOutsideBy);
        }
    }

    @Override
    public AlertRule rule() {
        return AlertRule.PRACTICAL_EQUIVALENCE;
    }

    @Override
    public Verdict judge(IdentifiedInterval interval, ConfidenceBand band) {
        String range = "[" + AlertText.num(low) + ", " + AlertText.num(high) + "]";
        String seen = AlertText.band(band);
        if (band.isRefuted() || !interval.isBounded()) {
            return Verdict.unmet(seen + ": the assumptions contradict the data");
        }
        boolean inside = band.lower() >= low && band.upper() <= high && interval.lower() >= low && interval.upper() <= high;
        if (inside) {
            return Verdict.met("", seen + " lies inside " + range);
        }
        if (clearOutsideBy > 0 && (band.lower() < low - clearOutsideBy || band.upper() > high + clearOutsideBy)) {
            return Verdict.clear(seen + " reaches beyond " + range + " by more than clear-outside-by " + AlertText.num(clearOutsideBy));
        }
        return Verdict.unmet(seen + " is not inside " + range);
    }

    @Override
    public Map<String, Double> limits() {
        Map<String, Double> m = new LinkedHashMap<>();
        m.put("equivalenceLower", low);
        m.put("equivalenceUpper", high);
        m.put("clearOutsideBy", clearOutsideBy);
        return m;
    }
}
