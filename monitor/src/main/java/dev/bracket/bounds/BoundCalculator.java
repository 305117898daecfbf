package dev.bracket.bounds;

/**
 * Sharp bounds on the average treatment effect from one cell's observed arms.
 *
 * <p>With {@code p = P(T = 1)}, {@code mu1 = E[Y | T = 1]}, {@code mu0 = E[Y | T = 0]} and the
 * unobserved {@code m10 = E[Y1 | T = 0]}, {@code m01 = E[Y0 | T = 1]}, the law of total expectation
 * gives (Manski 1990, AER P&amp;P 80(2), eq. for E[Y1] - E[Y0]):
 *
 * <pre>
 *   ATE = p*mu1 + (1-p)*m10 - (1-p)*mu0 - p*m01
 * </pre>
 *
 * The ATE is increasing in m10 and decreasing in m01, so over the box the assumptions leave for
 * (m10, m01) (see {@link AssumptionSet#constrain}) the lowest value uses (min m10, max m01) and
 * the highest (max m10, min m01). The box is a product of intervals; an empty box (beyond
 * rounding, see {@link OutcomeRange#roundingSlack()}) means
 * {@link BoundStatus#REFUTED}.
 *
 * <p>Pending outcomes: mu1 and mu0 are then only known to lie in their {@link ArmMeanRange}s
 * (Horowitz &amp; Manski 2000, JASA 95(449)), and the identified set is the union of the
 * intervals over that box of arm means: each (mu1, mu0) in it is the arm means of some joint law
 * of outcomes and responses consistent with the data, and the assumptions then act as without
 * pending outcomes. The ends are monotone in the means, so the lowest lower end sits at
 * (mu1 low, mu0 high) and the highest upper end at (mu1 high, mu0 low); where the assumptions
 * refute a corner, the extreme moves to where the box meets {@code mu1 = mu0}
 * ({@link MeanVertices}). The treated share counts every exposed unit.
 */
public final class BoundCalculator {

    private BoundCalculator() {
    }

    /** Bounds from a cell's arms; {@link BoundStatus#INSUFFICIENT_DATA} when an arm is empty. */
    public static IdentifiedInterval interval(ObservedArms arms, OutcomeRange range, AssumptionSet assumptions) {
        if (arms.hasEmptyArm()) {
            return IdentifiedInterval.insufficientData();
        }
        ArmMeanRange treated = ArmMeanRange.of(arms.treated(), range, assumptions);
        ArmMeanRange control = ArmMeanRange.of(arms.control(), range, assumptions);
        return hull(arms.treatedShare(), treated.lowMean(range), treated.highMean(range),
                control.lowMean(range), control.highMean(range), range, assumptions);
    }

    /**
     * The union of the intervals over a box of arm means at treated share {@code p}: the lowest
     * lower and highest upper end over {@link MeanVertices}; refuted when the assumptions refute
     * every point of the box. A box that is a single point gives {@link #interval(double, double,
     * double, OutcomeRange, AssumptionSet)} at that point.
     */
    public static IdentifiedInterval hull(double p, double mu1Low, double mu1High, double mu0Low, double mu0High,
                                          OutcomeRange range, AssumptionSet assumptions) {
        if (mu1Low == mu1High && mu0Low == mu0High) {
            return interval(p, mu1Low, mu0Low, range, assumptions); // every vertex is this point: the usual case, no pending outcomes
        }
        double lower = Double.POSITIVE_INFINITY;
        double upper = Double.NEGATIVE_INFINITY;
        for (double[] m : MeanVertices.of(mu1Low, mu1High, mu0Low, mu0High)) {
            IdentifiedInterval at = interval(p, m[0], m[1], range, assumptions);
            if (at.isBounded()) {
                lower = Math.min(lower, at.lower());
                upper = Math.max(upper, at.upper());
            }
        }
        return lower <= upper ? IdentifiedInterval.of(lower, upper) : IdentifiedInterval.refuted();
    }

    /**
     * Bounds as a function of the three observable quantities. The ends are linear in {@code p}
     * for fixed means, non-decreasing in {@code mu1} and non-increasing in {@code mu0}; the
     * confidence bands rely on that.
     */
    public static IdentifiedInterval interval(double p, double mu1, double mu0, OutcomeRange range, AssumptionSet assumptions) {
        UnobservedMeans box = assumptions.constrain(range, mu1, mu0);
        if (box.isEmpty(range.roundingSlack())) {
            return IdentifiedInterval.refuted();
        }
        double q = 1 - p;
        // Grouped by arm so that a constraint binding at an observed mean cancels exactly.
        double lower = p * (mu1 - box.m01High()) + q * (box.m10Low() - mu0);
        double upper = p * (mu1 - box.m01Low()) + q * (box.m10High() - mu0);
        // Rounding can leave lower a hair above upper when the box is (nearly) a single point.
        return IdentifiedInterval.spanning(lower, upper);
    }
}
