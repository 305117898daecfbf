package dev.bracket.bands;

/**
 * One-sided time-uniform confidence bounds for the mean of a bounded per-unit quantity that adapt
 * to its spread, from the running count, mean and sum of squared deviations alone (statistics
 * that add up across partitions, see {@link dev.bracket.bounds.ArmStatistics#merge}).
 *
 * <p>Why it is valid. Let {@code X_i} have conditional mean {@code mu} given the past and lie in
 * an interval of width at most {@code c}. For a hypothesised mean {@code mu} put
 * {@code xi_i = (mu - X_i) / c} (for the upper bound; {@code (X_i - mu) / c} for the lower), so
 * {@code xi_i >= -1}. Fan, Grama &amp; Liu (2015), "Exponential inequalities for martingales with
 * applications", Electron. J. Probab. 20(1), Lemma 4.1 (recalled from memory, and checked
 * numerically in the tests), gives for {@code xi >= -1} and {@code 0 <= lambda < 1}
 *
 * <pre>
 *   exp(lambda xi - psi(lambda) xi^2) &lt;= 1 + lambda xi,   psi(lambda) = -ln(1 - lambda) - lambda
 * </pre>
 *
 * so {@code M_t(lambda) = exp(lambda sum xi_i - psi(lambda) sum xi_i^2)} is a nonnegative
 * supermartingale (the empirical-Bernstein supermartingale of Howard, Ramdas, McAuliffe &amp;
 * Sekhon 2021, "Time-uniform, nonparametric, nonasymptotic confidence sequences", Ann. Statist.
 * 49(2), Thm 4, with the hypothesised mean itself as the predictable centre: a constant is
 * predictable, and it makes the variance process {@code sum (X_i - mu)^2 = M2 + t (mean - mu)^2}
 * additive). On a grid {@code lambda_k = 0.5 * 2^(-k/2)} with weights {@code w_k} summing to 1,
 * Ville's inequality and a union bound give {@code P(exists t, k: M_t(lambda_k) >= 1 / (alpha
 * w_k)) <= alpha}. A hypothesised mean at distance {@code d = mu - mean} is therefore rejected
 * when, for some k,
 *
 * <pre>
 *   lambda_k t d / c - psi(lambda_k) (M2 + t d^2) / c^2 &gt;= ln(1 / (alpha w_k))
 * </pre>
 *
 * For {@code lambda <= 1/2} the left side increases in d on {@code [0, c]} (its vertex lies at
 * {@code lambda c / (2 psi(lambda)) >= c (1 - lambda) / lambda >= c}), so the rejected means
 * form one interval beyond the smaller root of that quadratic, and the bound is the mean plus the
 * smallest root over k: closed form, O(grid) per look, independent of the order of the data.
 *
 * <p>No standard deviation is needed: the spread enters only through the observed M2. Where it
 * is unknown (summary statistics without an SD) any larger value keeps the guarantee, and the
 * callers use the Bhatia–Davis bound {@code M2 <= t (mean - lo)(hi - mean)}.
 *
 * <p>Tuning: the weights {@code w_k} fall off as {@code 1 / (1 + |k - k0|)^2} around the grid
 * point {@code k0} that is best for {@code plannedCount} observations of a law whose standard
 * deviation is a quarter of the width (variance {@code c^2 / 16}: a typical spread between the
 * widest law, {@code c^2 / 4}, and concentrated ones; a choice, no source). The best lambda grows
 * as the spread shrinks, so centring on the widest law put every real law's best point several
 * grid steps away at a heavy weight penalty; like any tuning it must be fixed before the data
 * are seen, and any weights summing to one keep the guarantee.
 *
 * <p>Immutable; the thresholds are computed once.
 */
public final class EmpiricalBernsteinBoundary {

    /**
     * Grid points: lambda from 1/2 down by factors of sqrt(2) to about 1e-8, below the best lambda
     * (about {@code sqrt(2 ln(1/alpha) c^2 / (n sigma^2))}) for any count up to 10^15 at alpha down to 1e-6.
     */
    private static final int GRID = 48;

    private static final double[] LAMBDA = new double[GRID];
    private static final double[] PSI = new double[GRID];

    static {
        for (int k = 0; k < GRID; k++) {
            LAMBDA[k] = lambda(k);
            PSI[k] = psi(LAMBDA[k]);
        }
    }

    private static final double LN2 = Math.log(2);

    private final double[] thresholds;
    /** The grid point with the largest weight. */
    private final int centre;

    /**
     * @param alpha        error probability of the one-sided bound, in (0, 1)
     * @param plannedCount observations at which the weights peak, &gt;= 1
     */
    public EmpiricalBernsteinBoundary(double alpha, long plannedCount) {
        if (!(alpha > 0 && alpha < 1)) {
            throw new IllegalArgumentException("alpha must lie strictly between 0 and 1, was " + alpha);
        }
        if (plannedCount < 1) {
            throw new IllegalArgumentException("planned count must be >= 1, was " + plannedCount);
        }
        this.centre = centre(alpha, plannedCount);
        this.thresholds = thresholds(alpha, centre);
    }

    /** {@code lambda_k = 0.5 * 2^(-k/2)}. */
    static double lambda(int k) {
        return 0.5 * Math.pow(2, -k / 2.0);
    }

    /** {@code psi(lambda) = -ln(1 - lambda) - lambda}, the sub-exponential cumulant bound. */
    static double psi(double lambda) {
        return -Math.log1p(-lambda) - lambda;
    }

    /**
     * How far beyond the observed mean the bound lies (the same on either side), after
     * {@code count} observations with sum of squared deviations {@code m2}, for a quantity whose
     * values lie in an interval of width at most {@code scale}; at most {@code room} (the distance
     * from the mean to the end of that interval), which is returned when no grid point rejects.
     */
    public double radius(long count, double m2, double scale, double room) {
        if (count <= 0) {
            return room;
        }
        if (scale <= 0) {
            return 0; // a constant quantity: its mean is known exactly
        }
        // Per-call ratios, so that the pass over the grid multiplies and adds only.
        double perScale = count / scale;
        double perScale2 = perScale / scale;
        double m2PerScale2 = m2 / (scale * scale);
        // The minimum over the grid does not depend on the order of the grid points; trying first the
        // one nearest the best lambda for these data, c sqrt(2 ln(1/alpha) / m2), lets the cheap test
        // below skip the square root at almost every other point.
        double guess = m2 > 0 ? scale * Math.sqrt(2 * thresholds[centre] / m2) : LAMBDA[0];
        int first = Math.max(0, Math.min(GRID - 1, (int) Math.round(2 * Math.log(0.5 / guess) / LN2)));
        double best = root(first, perScale, perScale2, m2PerScale2, room);
        // Every root is at least c0 / b = (psi M2 / c^2 + threshold) / (lambda t / c). Towards smaller
        // lambda (larger k) beyond the centre, threshold / lambda only grows; towards larger lambda
        // (smaller k), psi(lambda) / lambda only grows (psi is convex with psi(0) = 0). Once either
        // part alone reaches best, no grid point further on can beat it.
        for (int k = first + 1; k < GRID; k++) {
            if (k >= centre && thresholds[k] >= best * LAMBDA[k] * perScale) {
                break;
            }
            best = root(k, perScale, perScale2, m2PerScale2, best);
        }
        for (int k = first - 1; k >= 0; k--) {
            if (PSI[k] * m2PerScale2 >= best * LAMBDA[k] * perScale) {
                break;
            }
            best = root(k, perScale, perScale2, m2PerScale2, best);
        }
        return best;
    }

    /**
     * The smaller root at grid point k of {@code psi t / c^2 d^2 - lambda t / c d + psi M2 / c^2 +
     * threshold}, if it is below {@code best}; otherwise {@code best}.
     */
    private double root(int k, double perScale, double perScale2, double m2PerScale2, double best) {
        double b = LAMBDA[k] * perScale;
        double c0 = PSI[k] * m2PerScale2 + thresholds[k];
        if (c0 >= best * b) {
            return best; // the root 2 c0 / (b + sqrt(disc)) is at least c0 / b: it cannot beat best
        }
        double disc = b * b - 4 * (PSI[k] * perScale2) * c0;
        return disc >= 0 ? Math.min(best, 2 * c0 / (b + Math.sqrt(disc))) : best;
    }

    /** {@code ln(1 / (alpha w_k))} for every grid point. */
    private static double[] thresholds(double alpha, int k0) {
        double total = 0;
        for (int k = 0; k < GRID; k++) {
            total += weight(k, k0);
        }
        double[] out = new double[GRID];
        for (int k = 0; k < GRID; k++) {
            out[k] = Math.log(total / (alpha * weight(k, k0)));
        }
        return out;
    }

    private static double weight(int k, int k0) {
        double gap = 1 + Math.abs(k - k0);
        return 1 / (gap * gap);
    }

    /** The grid point nearest the best lambda after plannedCount observations of variance c^2/16, roughly sqrt(32 ln(1/alpha) / n). */
    private static int centre(double alpha, long plannedCount) {
        double best = Math.sqrt(32 * Math.log(1 / alpha) / plannedCount);
        int k = (int) Math.round(2 * Math.log(0.5 / best) / Math.log(2));
        return Math.max(0, Math.min(GRID - 1, k));
    }
}
