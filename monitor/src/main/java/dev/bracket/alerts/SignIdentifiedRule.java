package dev.bracket.alerts;

import dev.bracket.bands.ConfidenceBand;
import dev.bracket.bounds.IdentifiedInterval;

import java.util.LinkedHashMap;
import java.util.Map;

/**
 * Fires when the sign of the effect is identified: the confidence band lies wholly above zero
 * ({@code positive}) or wholly below ({@code negative}), and so does the estimated identified
 * interval. Requiring both makes a structural impossibility impossible here too: the worst-case
 * interval always contains zero (Manski 1990), so worst-case never fires, even in the rare
 * (probability at most alpha) event that its band misses the truth.
 *
 * @param clearZeroMargin a firing alert resolves at once when zero lies inside the band by at least
 *                    this much on both sides; 0 disables the margin (then only clear-after resolves)
 */
public record SignIdentifiedRule(double clearZeroMargin) implements RowRule {

    public SignIdentifiedRule {
        if (!(clearZeroMargin >= 0) || Double.isInfinite(clearZeroMargin)) {
            throw new IllegalArgumentException("sign-identified clear-zero-margin must be a finite number >= 0, was " + clearZeroMargin);
        }
    }

    @Override
    public AlertRule rule() {
        return AlertRule.SIGN_IDENTIFIED;
    }

    @Override
    public Verdict judge(IdentifiedInterval interval, ConfidenceBand band) {
        String seen = AlertText.band(band);
        if (band.isRefuted() || !interval.isBounded()) {
            return Verdict.unmet(seen + ": the assumptions contradict the data, no sign is identified");
        }
        if (band.lower() > 0 && interval.lower() > 0) {
            return Verdict.met("positive", seen + " lies above 0");
        }
        if (band.upper() < 0 && interval.upper() < 0) {
            return Verdict.met("negative", seen + " lies below 0");
        }
        if (band.lower() > 0 || band.upper() < 0) {
            return Verdict.unmet(seen + " excludes 0 but the estimated interval [" + AlertText.num(interval.lower())
                    + ", " + AlertText.num(interval.upper()) + "] does not");
        }
        if (clearZeroMargin > 0 && band.lower() <= -clearZeroMargin && band.upper() >= clearZeroMargin) {
            return Verdict.clear(seen + " contains 0 by at least clear-zero-margin " + AlertText.num(clearZeroMargin));
        }
        return Verdict.unmet(seen + " contains 0");
    }

    @Override
    public Map<String, Double> limits() {
        Map<String, Double> m = new LinkedHashMap<>();
        m.put("clearZeroMargin", clearZeroMargin);
        return m;
    }
}
