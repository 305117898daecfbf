package dev.bracket.bounds;

/**
 * Where an arm's mean outcome over all its units can lie when some outcomes are pending. With N
 * units, O observed outcomes summing to S and every pending outcome somewhere in [a, b], the
 * mean lies in (Horowitz &amp; Manski 2000, JASA 95(449), Sect. 2; Manski 2003, <i>Partial
 * Identification of Probability Distributions</i>, ch. 1)
 *
 * <pre>
 *   [ (S + (N - O) * a) / N ,  (S + (N - O) * b) / N ]
 * </pre>
 *
 * and every value in between is possible. Under {@link Assumption#MISSING_AT_RANDOM} pending
 * outcomes have the observed outcomes' mean, so the range shrinks to the complete-case mean
 * {@code S / O}; when no outcome of the arm has arrived yet that assumption says nothing and the
 * range is [a, b].
 *
 * @param low  the arm with its pending outcomes at the range's low end (the observed arm itself
 *             under missing-at-random); its mean is the range's low end
 * @param high the same with pending outcomes at the high end
 */
public record ArmMeanRange(ArmStatistics low, ArmStatistics high) {

    /** The range of an arm's mean under the given assumptions. */
    public static ArmMeanRange of(ArmStatistics arm, OutcomeRange range, AssumptionSet assumptions) {
        return assumptions.contains(Assumption.MISSING_AT_RANDOM)
                ? new ArmMeanRange(arm, arm)
                : new ArmMeanRange(arm.pendingAt(range.min()), arm.pendingAt(range.max()));
    }

    /** Lowest possible arm mean; the range's low end when no outcome is known. */
    public double lowMean(OutcomeRange range) {
        return low.isEmpty() ? range.min() : low.mean();
    }

    /** Highest possible arm mean; the range's high end when no outcome is known. */
    public double highMean(OutcomeRange range) {
        return high.isEmpty() ? range.max() : high.mean();
    }
}
