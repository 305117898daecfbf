package dev.bracket.bands;

import dev.bracket.bounds.BoundStatus;

/**
 * A confidence band around the identified interval of the average treatment effect: with
 * probability at least {@code level} the band holds the true ATE (for
 * {@link BandMethod#FIXED_HORIZON}, at one planned look) or the whole identified set at every
 * look at once (for {@link BandMethod#ANYTIME}).
 *
 * <p>The status says what the band is:
 * <ul>
 *   <li>{@link BoundStatus#BOUNDED}: {@code [lower, upper]} is the band;</li>
 *   <li>{@link BoundStatus#REFUTED}: no value of the observable quantities (treated share and
 *       arm means) inside their confidence region is compatible with the assumptions, so the data
 *       contradict the assumptions at this level. For a cell under {@code mtr-positive,mts-positive}
 *       (interval {@code [0, mu1 - mu0]}) this is exactly "the band for the lower end lies wholly
 *       above the band for the upper end"; for other sets it is the general form of that rule;</li>
 *   <li>{@link BoundStatus#INSUFFICIENT_DATA}: too few units for a band (an arm with no units, or
 *       for the fixed-horizon band an arm with a single unit).</li>
 * </ul>
 * Unless the status is identified the ends are {@code NaN} and must not be read; every
 * predicate below is false then.
 *
 * @param method how the band was built
 * @param level  the confidence level, {@code 1 - alpha}
 * @param status identified, refuted or insufficient data
 * @param lower  lower end of the band
 * @param upper  upper end of the band
 * @param basis  in plain words, what the band rests on (for people and alert text)
 */
public record ConfidenceBand(BandMethod method, double level, BoundStatus status, double lower, double upper, String basis) {

    public ConfidenceBand {
        if (method == null || status == null || basis == null) {
            throw new IllegalArgumentException("method, status and basis are required");
        }
        if (!(level > 0 && level < 1)) {
            throw new IllegalArgumentException("level must lie strictly between 0 and 1, was " + level);
        }
        if (status == BoundStatus.BOUNDED && !(Double.isFinite(lower) && Double.isFinite(upper) && lower <= upper)) {
            throw new IllegalArgumentException("a band needs finite ends with lower <= upper (" + lower + ", " + upper + ")");
        }
    }

    public static ConfidenceBand of(BandMethod method, double level, double lower, double upper, String basis) {
        return new ConfidenceBand(method, level, BoundStatus.BOUNDED, lower, upper, basis);
    }

    public static ConfidenceBand refuted(BandMethod method, double level, String basis) {
        return new ConfidenceBand(method, level, BoundStatus.REFUTED, Double.NaN, Double.NaN, basis);
    }

    public static ConfidenceBand insufficientData(BandMethod method, double level, String basis) {
        return new ConfidenceBand(method, level, BoundStatus.INSUFFICIENT_DATA, Double.NaN, Double.NaN, basis);
    }

    public boolean isBounded() {
        return status == BoundStatus.BOUNDED;
    }

    /** True when the data contradict the assumptions at this confidence level. */
    public boolean isRefuted() {
        return status == BoundStatus.REFUTED;
    }

    /** {@code upper - lower}; NaN unless identified. */
    public double width() {
        return upper - lower;
    }

    /** True when the whole band lies strictly above or strictly below zero: the sign of the effect is identified. */
    public boolean excludesZero() {
        return sign() != 0;
    }

    /** +1 when the band lies above zero, -1 below, 0 when it contains zero or is not identified. */
    public int sign() {
        if (!isBounded()) {
            return 0;
        }
        return lower > 0 ? 1 : upper < 0 ? -1 : 0;
    }

    /** True when {@code value} lies in the band. */
    public boolean contains(double value) {
        return isBounded() && value >= lower && value <= upper;
    }
}
