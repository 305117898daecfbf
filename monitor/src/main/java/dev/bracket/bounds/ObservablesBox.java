package dev.bracket.bounds;

import java.util.function.ToDoubleFunction;

/**
 * A box of plausible values for one cell's observable quantities: the treated share
 * {@code p in [pLow, pHigh]} and the arm means {@code mu1 in [mu1Low, mu1High]},
 * {@code mu0 in [mu0Low, mu0High]}. A confidence band is the hull of the identified intervals
 * over such a box (see {@code bands.BoxProjection}); the estimates themselves are the box
 * {@link #at} (a single point unless outcomes are pending).
 */
public record ObservablesBox(double pLow, double pHigh, double mu1Low, double mu1High, double mu0Low, double mu0High) {

    public ObservablesBox {
        if (!(pLow <= pHigh && mu1Low <= mu1High && mu0Low <= mu0High)) {
            throw new IllegalArgumentException("box needs low <= high in every coordinate: " + pLow + ".." + pHigh
                    + ", " + mu1Low + ".." + mu1High + ", " + mu0Low + ".." + mu0High);
        }
    }

    /**
     * A cell's box: the treated share's interval (over all units, pending ones included) and, per
     * arm, from the low end of its {@link ArmMeanRange} minus that end's radius to the high end plus
     * its radius, clipped to [0, 1] and the outcome range. Each end of an arm-mean range is itself
     * the mean of bounded per-unit quantities (the observed outcome, or a or b for a pending unit;
     * Horowitz &amp; Manski 2000, JASA 95(449)), so its radius comes from the same bounds as a plain
     * arm mean; without pending units both ends are the arm mean. An end with no units gives the
     * whole range.
     */
    public static ObservablesBox of(ObservedArms arms, OutcomeRange range, AssumptionSet assumptions, double p, double pRadius,
                                    ToDoubleFunction<ArmStatistics> meanRadius) {
        ArmMeanRange t = ArmMeanRange.of(arms.treated(), range, assumptions);
        ArmMeanRange c = ArmMeanRange.of(arms.control(), range, assumptions);
        double tLow = radius(t.low(), meanRadius);
        double cLow = radius(c.low(), meanRadius);
        // Without pending units both ends are the arm itself: one radius serves both.
        double tHigh = t.high() == t.low() ? tLow : radius(t.high(), meanRadius);
        double cHigh = c.high() == c.low() ? cLow : radius(c.high(), meanRadius);
        return new ObservablesBox(Math.max(0, p - pRadius), Math.min(1, p + pRadius),
                lowEnd(t.low(), range, tLow), highEnd(t.high(), range, tHigh),
                lowEnd(c.low(), range, cLow), highEnd(c.high(), range, cHigh));
    }

    private static double radius(ArmStatistics arm, ToDoubleFunction<ArmStatistics> radius) {
        return arm.isEmpty() ? Double.NaN : radius.applyAsDouble(arm);
    }

    private static double lowEnd(ArmStatistics arm, OutcomeRange range, double radius) {
        return arm.isEmpty() ? range.min() : Math.max(range.min(), arm.mean() - radius);
    }

    private static double highEnd(ArmStatistics arm, OutcomeRange range, double radius) {
        return arm.isEmpty() ? range.max() : Math.min(range.max(), arm.mean() + radius);
    }

    /**
     * The box of a cell's estimates: its treated share (over all units) and the arm-mean ranges
     * ({@link ArmMeanRange}; a single point per arm without pending outcomes). The mean of an arm
     * with no outcome is unknown, so it spans the whole range (a constraint on it then restricts
     * nothing).
     */
    public static ObservablesBox at(ObservedArms arms, OutcomeRange range, AssumptionSet assumptions) {
        return of(arms, range, assumptions, arms.treatedShare(), 0, arm -> 0);
    }

    /** The box around estimates with the given half-widths, clipped to [0, 1] and the outcome range. */
    public static ObservablesBox around(double p, double pRadius, double mu1, double mu1Radius, double mu0, double mu0Radius,
                                 OutcomeRange range) {
        return new ObservablesBox(
                Math.max(0, p - pRadius), Math.min(1, p + pRadius),
                Math.max(range.min(), mu1 - mu1Radius), Math.min(range.max(), mu1 + mu1Radius),
                Math.max(range.min(), mu0 - mu0Radius), Math.min(range.max(), mu0 + mu0Radius));
    }

    /** The (mu1, mu0) pairs where an end can take its extreme over the box: see {@link MeanVertices}. */
    public double[][] meanVertices() {
        return MeanVertices.of(mu1Low, mu1High, mu0Low, mu0High);
    }
}
