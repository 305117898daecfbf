package dev.bracket.bounds;

/**
 * A box of values the two means no data can reveal may take: {@code m10 = E[Y1 | T = 0]} (the
 * untreated units' mean had they been treated) in [m10Low, m10High] and {@code m01 = E[Y0 | T = 1]}
 * (the treated units' mean had they not been treated) in [m01Low, m01High]. Every assumption in
 * {@link Assumption} narrows this box; an empty box means the assumptions contradict the data.
 *
 * <p>A constraint whose value is {@code NaN} is vacuous: it refers to the mean of an arm with no
 * units, and a condition on a group that does not occur restricts nothing. This matters only
 * for instrument levels where every unit is in one arm (see {@link InstrumentBounds}).
 */
public record UnobservedMeans(double m10Low, double m10High, double m01Low, double m01High) {

    /** The box under no assumption but the outcome range: both means anywhere in [min, max] (Manski 1990). */
    public static UnobservedMeans unrestricted(OutcomeRange range) {
        return new UnobservedMeans(range.min(), range.max(), range.min(), range.max());
    }

    /** Requires {@code m10 >= value}. */
    public UnobservedMeans m10AtLeast(double value) {
        return Double.isNaN(value) ? this : new UnobservedMeans(Math.max(m10Low, value), m10High, m01Low, m01High);
    }

    /** Requires {@code m10 <= value}. */
    public UnobservedMeans m10AtMost(double value) {
        return Double.isNaN(value) ? this : new UnobservedMeans(m10Low, Math.min(m10High, value), m01Low, m01High);
    }

    /** Requires {@code m01 >= value}. */
    public UnobservedMeans m01AtLeast(double value) {
        return Double.isNaN(value) ? this : new UnobservedMeans(m10Low, m10High, Math.max(m01Low, value), m01High);
    }

    /** Requires {@code m01 <= value}. */
    public UnobservedMeans m01AtMost(double value) {
        return Double.isNaN(value) ? this : new UnobservedMeans(m10Low, m10High, m01Low, Math.min(m01High, value));
    }

    /**
     * True when no (m10, m01) satisfies every constraint: some lower end lies above its upper end
     * by more than {@code slack} (a smaller crossing is rounding in the observed means, see
     * {@link OutcomeRange#roundingSlack()}).
     */
    public boolean isEmpty(double slack) {
        return m10Low - m10High > slack || m01Low - m01High > slack;
    }
}
