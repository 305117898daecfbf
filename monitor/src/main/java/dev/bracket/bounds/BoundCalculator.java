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
 */
public final class BoundCalculator {

    private BoundCalculator() {
    }

    /** Bounds from a cell's arms; {@link BoundStatus#INSUFFICIENT_DATA} when an arm is empty. */
    public static IdentifiedInterval interval(ObservedArms arms, OutcomeRange range, AssumptionSet assumptions) {
        if (arms.hasEmptyArm()) {
            return IdentifiedInterval.insufficientData();
        }
        return interval(arms.treatedShare(), arms.treated().mean(), arms.control().mean(), range, assumptions);
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
