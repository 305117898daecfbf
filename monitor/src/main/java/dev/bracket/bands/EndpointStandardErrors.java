package dev.bracket.bands;

import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.BoundCalculator;
import dev.bracket.bounds.IdentifiedInterval;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeRange;

import java.util.Optional;

/**
 * Delta-method standard errors of the two ends of one cell's identified interval.
 *
 * <p>An end {@code f(p, mu1, mu0)} (see {@link BoundCalculator}) is estimated by plugging in
 * {@code p^ = n1/n} (variance {@code p(1-p)/n}) and the arm means (variances {@code s1^2/n1},
 * {@code s0^2/n0}); the three estimates are asymptotically independent, so (delta method, e.g.
 * van der Vaart 1998, <i>Asymptotic Statistics</i>, Thm 3.1)
 *
 * <pre>
 *   se(f)^2 = (df/dp)^2 p(1-p)/n + (df/dmu1)^2 s1^2/n1 + (df/dmu0)^2 s0^2/n0
 * </pre>
 *
 * The ends are linear in p, so {@code df/dp = f(1, mu1, mu0) - f(0, mu1, mu0)} exactly. In the
 * means they are piecewise linear, with kinks only where {@code mu1 = mu0} or a mean meets an end
 * of the outcome range; the derivative is that of the piece the estimate lies on, taken by
 * one-sided differences with a step smaller than the distance to the kink.
 *
 * <p>Limitation: the delta method assumes a differentiable end. At a kink (for instance
 * {@code mu1^ = mu0^} exactly) the active constraint is ambiguous; there the larger of the two
 * one-sided derivatives (in absolute value) is used, which errs towards a wider band, but
 * near a kink the normal approximation itself is poor. Where neither one-sided step stays
 * inside the range and compatible with the assumptions, no standard error is given (empty) and
 * {@link FixedHorizonBand} falls back to its conservative projection.
 *
 * @param lower standard error of the lower end
 * @param upper standard error of the upper end
 */
public record EndpointStandardErrors(double lower, double upper) {

    /** Relative step for the differences in the means: far below any sampling error, far above rounding. */
    private static final double STEP = 1e-6;

    /** Smallest relative step, so that rounding stays below one part in a million of the derivative. */
    private static final double MIN_STEP = 1e-10;

    public static Optional<EndpointStandardErrors> of(ObservedArms arms, OutcomeRange range, AssumptionSet assumptions,
                                                      VarianceBasis basis) {
        if (arms.hasEmptyArm()) {
            return Optional.empty();
        }
        double p = arms.treatedShare();
        double mu1 = arms.treated().mean();
        double mu0 = arms.control().mean();
        IdentifiedInterval at = BoundCalculator.interval(p, mu1, mu0, range, assumptions);
        if (!at.isBounded()) {
            return Optional.empty();
        }
        IdentifiedInterval allTreated = BoundCalculator.interval(1, mu1, mu0, range, assumptions);
        IdentifiedInterval noneTreated = BoundCalculator.interval(0, mu1, mu0, range, assumptions);
        double[] dp = {allTreated.lower() - noneTreated.lower(), allTreated.upper() - noneTreated.upper()};
        double[] d1 = meanDerivative(p, mu1, mu0, true, at, range, assumptions);
        double[] d0 = meanDerivative(p, mu1, mu0, false, at, range, assumptions);
        if (d1 == null || d0 == null) {
            return Optional.empty();
        }
        double varP = p * (1 - p) / arms.total();
        double var1 = basis.variance(arms.treated(), range) / arms.treated().count();
        double var0 = basis.variance(arms.control(), range) / arms.control().count();
        return Optional.of(new EndpointStandardErrors(
                Math.sqrt(dp[0] * dp[0] * varP + d1[0] * d1[0] * var1 + d0[0] * d0[0] * var0),
                Math.sqrt(dp[1] * dp[1] * varP + d1[1] * d1[1] * var1 + d0[1] * d0[1] * var0)));
    }

    /**
     * Derivatives of (lower, upper) in mu1 (or mu0): one-sided differences on each side that stays
     * in the range and compatible with the assumptions, the larger in absolute value per end;
     * null when neither side is usable.
     */
    private static double[] meanDerivative(double p, double mu1, double mu0, boolean treated, IdentifiedInterval at,
                                           OutcomeRange range, AssumptionSet assumptions) {
        double mu = treated ? mu1 : mu0;
        // Stay on the estimate's side of the kink at mu1 = mu0, unless it is too close to tell
        // (then the max-abs rule below keeps the error on the wide side).
        double gap = Math.abs(mu1 - mu0);
        double h = Math.min(STEP, Math.max(gap / range.width() / 2, MIN_STEP)) * range.width();
        double[] best = null;
        for (double step : new double[] {h, -h}) {
            double moved = mu + step;
            if (moved < range.min() || moved > range.max()) {
                continue;
            }
            IdentifiedInterval there = treated
                    ? BoundCalculator.interval(p, moved, mu0, range, assumptions)
                    : BoundCalculator.interval(p, mu1, moved, range, assumptions);
            if (!there.isBounded()) {
                continue;
            }
            double[] d = {(there.lower() - at.lower()) / step, (there.upper() - at.upper()) / step};
            if (best == null) {
                best = d;
            } else {
                best[0] = Math.abs(d[0]) > Math.abs(best[0]) ? d[0] : best[0];
                best[1] = Math.abs(d[1]) > Math.abs(best[1]) ? d[1] : best[1];
            }
        }
        return best;
    }
}
