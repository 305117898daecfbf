package dev.bracket.bands;

/**
 * A time-uniform confidence sequence for the mean of observations in [0, 1], from the running
 * count and sum alone: the two-sided normal-mixture boundary of Howard, Ramdas, McAuliffe &amp;
 * Sekhon (2021), "Time-uniform, nonparametric, nonasymptotic confidence sequences", Ann. Statist.
 * 49(2), §3 (the normal mixture, after Robbins 1970, Ann. Math. Statist. 41(5)); the equation
 * number in the paper is not recalled reliably, so the derivation is given here.
 *
 * <p>Observations in [0, 1] have increments {@code X_i - mu} that are sub-Gaussian with variance
 * proxy 1/4 (Hoeffding 1963, JASA 58(301), Lemma 1 — the range (b-a)/2 = 1/2 squared), whatever
 * their law. With {@code S_t = sum (X_i - mu)} and {@code V_t = t/4}, {@code exp(lambda S_t -
 * lambda^2 V_t / 2)} is a nonnegative supermartingale for each real lambda; mixing lambda over
 * N(0, 1/rho) gives {@code sqrt(rho / (V_t + rho)) exp(S_t^2 / (2 (V_t + rho)))}, and Ville's
 * inequality bounds the chance that it ever exceeds 1/alpha by alpha. Hence, with probability at
 * least 1 - alpha, simultaneously for every t,
 *
 * <pre>
 *   |S_t| &lt; u(V_t),   u(v) = sqrt( (v + rho) * ( ln(1 + v/rho) + 2 ln(1/alpha) ) )
 * </pre>
 *
 * and the confidence sequence for mu is {@code sum/t -+ u(t/4)/t}. It depends on the data only
 * through (count, sum), which add up across partitions, does not depend on the order of the
 * observations, and costs O(1) per look.
 *
 * <p>Tuning: rho sets the intrinsic time at which the boundary is tightest. It must be fixed
 * before the data are seen (choosing it from the data would void the time-uniform guarantee).
 * {@link #tunedFor} picks the rho minimising {@code u(m)} at {@code m = plannedCount / 4}: setting
 * the derivative to zero gives {@code x - ln x = 1 + 2 ln(1/alpha)} with {@code x = 1 + m/rho}
 * (derivation above; Howard et al. state a closed-form approximation to the same optimum).
 *
 * @param alpha error probability of the two-sided sequence, in (0, 1)
 * @param rho   mixture precision, in units of intrinsic time (observations / 4), &gt; 0
 */
public record NormalMixtureBoundary(double alpha, double rho) {

    /** Variance proxy of one observation in [0, 1] (Hoeffding's lemma). */
    static final double UNIT_VARIANCE_PROXY = 0.25;

    public NormalMixtureBoundary {
        if (!(alpha > 0 && alpha < 1)) {
            throw new IllegalArgumentException("alpha must lie strictly between 0 and 1, was " + alpha);
        }
        if (!(rho > 0) || Double.isInfinite(rho)) {
            throw new IllegalArgumentException("rho must be a finite number > 0, was " + rho);
        }
    }

    /** The boundary at error {@code alpha}, tightest after {@code plannedCount} observations. */
    public static NormalMixtureBoundary tunedFor(double alpha, long plannedCount) {
        if (plannedCount < 1) {
            throw new IllegalArgumentException("planned count must be >= 1, was " + plannedCount);
        }
        double m = plannedCount * UNIT_VARIANCE_PROXY;
        return new NormalMixtureBoundary(alpha, m / (optimalRatio(alpha) - 1));
    }

    /**
     * The root x &gt; 1 of {@code x - ln x = 1 + 2 ln(1/alpha)}. The left side is increasing and
     * convex for x &gt; 1, so Newton's method started above the root ({@code c + ln c + 1} is) falls
     * monotonically onto it; cheap enough to run at every look.
     */
    static double optimalRatio(double alpha) {
        double c = 1 + 2 * Math.log(1 / alpha);
        double x = c + Math.log(c) + 1;
        for (int i = 0; i < 100; i++) {
            double next = x - (x - Math.log(x) - c) / (1 - 1 / x);
            if (!(next < x)) {
                break;
            }
            x = next;
        }
        return x;
    }

    /** {@code u(v)}: the bound on |S_t| at intrinsic time v. */
    public double boundary(double v) {
        return Math.sqrt((v + rho) * (Math.log1p(v / rho) + 2 * Math.log(1 / alpha)));
    }

    /** Half-width of the confidence sequence for the mean after {@code count} observations in [0, 1]; infinite for none. */
    public double radius(long count) {
        if (count <= 0) {
            return Double.POSITIVE_INFINITY;
        }
        return boundary(count * UNIT_VARIANCE_PROXY) / count;
    }
}
