package dev.bracket.bands;

import org.apache.commons.math3.analysis.solvers.BrentSolver;
import org.apache.commons.math3.distribution.NormalDistribution;

import java.util.Map;
import java.util.concurrent.ConcurrentHashMap;

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

    /** Tables of a few levels (a deployment uses one or two); cleared if callers keep asking for new ones. */
    private static final Map<Double, Table> TABLES = new ConcurrentHashMap<>();
    private static final int MAX_TABLES = 16;
    private static volatile Table lastTable;

    private ImbensManski() {
    }

    /**
     * The critical value C solving {@code Phi(C + x) - Phi(-C) = level} for
     * {@code x = Delta / max(se_l, se_u) >= 0}.
     *
     * <p>Called for every band of every publish, so the root is not searched afresh: the roots at
     * a grid of x (found once per level with Commons Math's {@link BrentSolver}) are the starting
     * points of Newton's method, whose function and slope near a grid point are exact Taylor
     * series of the normal distribution ({@code d^n/du^n phi(u) = (-1)^n He_n(u) phi(u)}, with the
     * probabilists' Hermite polynomials {@code He_n}, Abramowitz &amp; Stegun 1964, 22.11.8 and
     * 26.2.17 — recalled from memory). The grid spacing keeps every step within 1/32 of a grid
     * point, where the series to the 12th power is exact to rounding.
     */
    public static double criticalValue(double level, double scaledWidth) {
        if (!(level > 0 && level < 1)) {
            throw new IllegalArgumentException("level must lie strictly between 0 and 1, was " + level);
        }
        if (!(scaledWidth >= 0)) {
            throw new IllegalArgumentException("scaled width must be >= 0, was " + scaledWidth);
        }
        Table table = lastTable;
        if (table != null && table.level == level) {
            return table.criticalValue(scaledWidth); // the usual case: one level for every band
        }
        table = TABLES.get(level);
        if (table == null) {
            if (TABLES.size() >= MAX_TABLES) {
                TABLES.clear();
            }
            table = TABLES.computeIfAbsent(level, Table::new);
        }
        lastTable = table;
        return table.criticalValue(scaledWidth);
    }

    /** The root by bracketing (Commons Math {@link BrentSolver}): the grid's values. */
    private static double solve(double level, double oneSided, double twoSided, double scaledWidth) {
        // The left side increases in C; it is >= level at the two-sided value and <= level at the one-sided one.
        return new BrentSolver(1e-14, 1e-13).solve(200,
                c -> STANDARD_NORMAL.cumulativeProbability(c + scaledWidth) - STANDARD_NORMAL.cumulativeProbability(-c) - level,
                oneSided - 1e-9, twoSided + 1e-9);
    }

    /** One level's grid of roots, with the normal distribution at both arguments of each root. */
    private static final class Table {
        private static final double STEP = 1.0 / 32;
        private static final int TERMS = 12;
        private static final double[] INVERSE_FACTORIAL = new double[TERMS + 1];

        static {
            double f = 1;
            for (int n = 0; n <= TERMS; n++) {
                f *= n == 0 ? 1 : n;
                INVERSE_FACTORIAL[n] = 1 / f;
            }
        }

        private final double level;
        private final double oneSided;
        /** Per grid point x_i = i STEP: the root c_i, Phi(c_i + x_i), phi(c_i + x_i), Phi(-c_i), phi(c_i). */
        private final double[] root;
        private final double[] cdfUpper;
        private final double[] densityUpper;
        private final double[] cdfLower;
        private final double[] densityLower;

        Table(double level) {
            this.level = level;
            this.oneSided = STANDARD_NORMAL.inverseCumulativeProbability(level);
            double twoSided = STANDARD_NORMAL.inverseCumulativeProbability((1 + level) / 2);
            int points = (int) Math.ceil(Math.max(0, FAR - oneSided) / STEP) + 2;
            root = new double[points];
            cdfUpper = new double[points];
            densityUpper = new double[points];
            cdfLower = new double[points];
            densityLower = new double[points];
            for (int i = 0; i < points; i++) {
                double x = i * STEP;
                double c = solve(level, oneSided, twoSided, x);
                root[i] = c;
                cdfUpper[i] = STANDARD_NORMAL.cumulativeProbability(c + x);
                densityUpper[i] = STANDARD_NORMAL.density(c + x);
                cdfLower[i] = STANDARD_NORMAL.cumulativeProbability(-c);
                densityLower[i] = STANDARD_NORMAL.density(c);
            }
        }

        double criticalValue(double x) {
            if (oneSided + x >= FAR) {
                return oneSided;
            }
            int i = (int) Math.rint(x / STEP);
            double x0 = i * STEP;
            double c0 = root[i];
            double u0 = c0 + x0;
            // Start on the tangent of C(x) (implicit function theorem), then Newton on f(c) = Phi(c + x) - Phi(-c) - level.
            double slope = -densityUpper[i] / (densityUpper[i] + densityLower[i]);
            double d = slope * (x - x0); // c - c0
            for (int step = 0; step < 8; step++) {
                double du = d + (x - x0);
                // Phi(u0 + du) - Phi(u0) and phi(u0 + du); Phi(-(c0 + d)) - Phi(-c0) and phi(c0 + d).
                double upper = series(u0, du, densityUpper[i]);
                double lower = series(-c0, -d, densityLower[i]);
                double f = (cdfUpper[i] - cdfLower[i] - level) + upper - lower;
                double slopeF = lastDensity(u0, du, densityUpper[i]) + lastDensity(-c0, -d, densityLower[i]);
                double change = f / slopeF;
                d -= change;
                if (Math.abs(change) <= 1e-14 * Math.max(1, Math.abs(c0 + d))) { // the next change would be below rounding
                    break;
                }
            }
            return c0 + d;
        }

        /** {@code Phi(a + h) - Phi(a)} from {@code phi(a)}: {@code phi(a) sum_{n>=1} (-1)^(n-1) He_(n-1)(a) h^n / n!}. */
        private static double series(double a, double h, double density) {
            double hePrev = 0; // He_(-1), so that the recurrence gives He_1 = a
            double he = 1; // He_0
            double power = h;
            double sum = 0;
            double sign = 1;
            for (int n = 1; n <= TERMS; n++) {
                sum += sign * he * power * INVERSE_FACTORIAL[n];
                double next = a * he - (n - 1) * hePrev;
                hePrev = he;
                he = next;
                power *= h;
                sign = -sign;
            }
            return density * sum;
        }

        /** {@code phi(a + h)} from {@code phi(a)}: {@code phi(a) sum_{n>=0} (-1)^n He_n(a) h^n / n!}. */
        private static double lastDensity(double a, double h, double density) {
            double hePrev = 0;
            double he = 1;
            double power = 1;
            double sum = 0;
            double sign = 1;
            for (int n = 0; n < TERMS; n++) {
                sum += sign * he * power * INVERSE_FACTORIAL[n];
                double next = a * he - n * hePrev;
                hePrev = he;
                he = next;
                power *= h;
                sign = -sign;
            }
            return density * sum;
        }
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
