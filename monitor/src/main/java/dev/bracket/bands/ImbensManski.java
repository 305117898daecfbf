package dev.bracket.bands;

import org.apache.commons.math3.analysis.solvers.BrentSolver;
import org.apache.commons.math3.distribution.NormalDistribution;

/**
 * The fixed-horizon confidence interval for a partially identified parameter of Imbens &amp;
 * Manski (2004), "Confidence intervals for partially identified parameters", Econometrica 72(6),
 * with the width pre-test of Stoye (2009), "More on confidence intervals for partially identified
 * parameters", Econometrica 77(4).
 *
 * <p>Given estimated ends {@code l <= u} with standard errors {@code se_l, se_u}, the interval
 *
 * <pre>
 *   [ l - C se_l ,  u + C se_u ],   Phi(C + Delta / max(se_l, se_u)) - Phi(-C) = 1 - alpha
 * </pre>
 *
 * covers every point of the identified set with probability at least 1 - alpha asymptotically
 * (Imbens &amp; Manski 2004, §4, with {@code Delta / max(se)} written for their
 * {@code sqrt(N) Delta / max(sigma)}). C runs from {@code z(1 - alpha/2)} for a point-identified
 * parameter (Delta = 0) down to {@code z(1 - alpha)} for a long interval, where only one end can
 * be near the truth.
 *
 * <p>Short intervals: Imbens and Manski's uniformity argument lets the width enter through its
 * estimate only if that estimate is superefficient, which Stoye (2009) pointed out and which
 * fails here whenever the width depends on estimated means (e.g. {@code [0, mu1 - mu0]} under
 * {@code mtr-positive,mts-positive}). Following Stoye's remedy, the estimated width is used only
 * when it is clearly positive, {@code Delta^ > kappa_N max(se)}, and is set to 0 otherwise, so
 * that near point identification the interval falls back to the conservative
 * {@code z(1 - alpha/2)} on both sides. The threshold {@code kappa_N = sqrt(ln N)} (which grows,
 * while {@code kappa_N / sqrt(N)} shrinks, as Stoye's condition requires) is the BIC-type choice
 * of Andrews &amp; Soares (2010), Econometrica 78(1), for deciding that an inequality is far from
 * binding. (Stoye's pre-test is recalled from memory; the threshold is our choice.)
 */
public final class ImbensManski {

    private static final NormalDistribution STANDARD_NORMAL = new NormalDistribution(0, 1);

    /**
     * Once {@code z(level) + x} passes this value, {@code Phi(C + x)} rounds to 1 in double precision
     * for every C in the bracket ({@code 1 - Phi(9) ~ 1e-19}), so the root is {@code z(level)} exactly.
     */
    private static final double FAR = 9;

    private ImbensManski() {
    }

    /**
     * The critical value C solving {@code Phi(C + x) - Phi(-C) = level} for
     * {@code x = Delta / max(se_l, se_u) >= 0} (Commons Math {@link BrentSolver}).
     */
    public static double criticalValue(double level, double scaledWidth) {
        if (!(level > 0 && level < 1)) {
            throw new IllegalArgumentException("level must lie strictly between 0 and 1, was " + level);
        }
        if (!(scaledWidth >= 0)) {
            throw new IllegalArgumentException("scaled width must be >= 0, was " + scaledWidth);
        }
        double oneSided = STANDARD_NORMAL.inverseCumulativeProbability(level);
        double twoSided = STANDARD_NORMAL.inverseCumulativeProbability((1 + level) / 2);
        if (oneSided + scaledWidth >= FAR) {
            return oneSided;
        }
        // The left side increases in C; it is >= level at the two-sided value and <= level at the one-sided one.
        return new BrentSolver(1e-14, 1e-13).solve(200,
                c -> STANDARD_NORMAL.cumulativeProbability(c + scaledWidth) - STANDARD_NORMAL.cumulativeProbability(-c) - level,
                oneSided - 1e-9, twoSided + 1e-9);
    }

    /**
     * The interval around estimated ends, with Stoye's width pre-test at sample size {@code n}
     * (the number of units behind the estimates).
     *
     * @return {lower, upper}
     */
    static double[] interval(double lower, double upper, double seLower, double seUpper, double level, long n) {
        double se = Math.max(seLower, seUpper);
        if (se == 0) {
            return new double[] {lower, upper};
        }
        double width = upper - lower;
        double kappa = Math.sqrt(Math.log(Math.max(n, 2)));
        double usedWidth = width > kappa * se ? width : 0;
        double c = criticalValue(level, usedWidth / se);
        return new double[] {lower - c * seLower, upper + c * seUpper};
    }
}
