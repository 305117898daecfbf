package dev.bracket.bounds;

/**
 * Sufficient statistics of one arm's outcomes: count, mean, sum of squared deviations from the
 * mean ({@code m2}), minimum and maximum. Immutable; {@link #add(double)} and {@link #merge}
 * return new values.
 *
 * <p>Single observations are folded in with Welford's update (Welford 1962, Technometrics 4(3),
 * "Note on a method for calculating corrected sums of squares and products"). Two summaries are
 * combined with the pairwise formula of Chan, Golub and LeVeque (1979/1983, "Updating formulae and
 * a pairwise algorithm for computing sample variances"):
 *
 * <pre>
 *   n  = nA + nB
 *   d  = meanB - meanA
 *   mean = meanA + d * nB / n
 *   M2 = M2A + M2B + d^2 * nA * nB / n
 * </pre>
 *
 * so partitions can be merged in any order and agree with one pass over all observations.
 *
 * <p>{@code min} and {@code max} are {@code NaN} when unknown (for statistics built from a
 * published summary rather than from observations) and for the empty arm.
 *
 * <p>{@code exposed} counts units known to have entered the arm (exposure events, or observed
 * plus pending units given on the command line); 0 when no exposures are reported, and then the
 * arm is its observed units, as before exposures existed. Counts add under {@link #merge}, so
 * partitions and partials stay additive. The arm's units are {@code max(count, exposed)}; the
 * difference {@code exposed - count} (when positive) is the pending units, whose outcomes have
 * not arrived; outcomes beyond the exposures are a data-quality finding
 * ({@link #excessOutcomes()}), never an error.
 */
public record ArmStatistics(long count, double mean, double m2, double min, double max, long exposed) {

    private static final ArmStatistics EMPTY = new ArmStatistics(0, 0.0, 0.0, Double.NaN, Double.NaN);

    public ArmStatistics {
        if (count < 0 || exposed < 0) {
            throw new IllegalArgumentException("counts must be >= 0, were count=" + count + ", exposed=" + exposed);
        }
        if (!Double.isFinite(mean) || !Double.isFinite(m2) || m2 < 0) {
            throw new IllegalArgumentException("mean and m2 must be finite and m2 >= 0 (mean=" + mean + ", m2=" + m2 + ")");
        }
    }

    /** Statistics of observed outcomes only, with no exposures reported. */
    public ArmStatistics(long count, double mean, double m2, double min, double max) {
        this(count, mean, m2, min, max, 0);
    }

    /** The arm with no observations. */
    public static ArmStatistics empty() {
        return EMPTY;
    }

    /** One pass of Welford's update over the given observations. */
    public static ArmStatistics of(double... observations) {
        ArmStatistics s = EMPTY;
        for (double y : observations) {
            s = s.add(y);
        }
        return s;
    }

    /**
     * Statistics from a published summary: count, mean and sample standard deviation (divisor
     * n - 1). The extremes are unknown.
     */
    public static ArmStatistics ofSummary(long count, double mean, double sampleSd) {
        if (!(sampleSd >= 0) || Double.isInfinite(sampleSd)) {
            throw new IllegalArgumentException("standard deviation must be finite and >= 0, was " + sampleSd);
        }
        double m2 = count > 1 ? sampleSd * sampleSd * (count - 1) : 0.0;
        return new ArmStatistics(count, count == 0 ? 0.0 : mean, m2, Double.NaN, Double.NaN);
    }

    /** Welford's update: this arm plus one observation. */
    public ArmStatistics add(double y) {
        if (!Double.isFinite(y)) {
            throw new IllegalArgumentException("observation must be finite, was " + y);
        }
        long n = count + 1;
        double delta = y - mean;
        double newMean = mean + delta / n;
        double newM2 = m2 + delta * (y - newMean);
        double newMin = count == 0 ? y : Math.min(min, y);
        double newMax = count == 0 ? y : Math.max(max, y);
        return new ArmStatistics(n, newMean, newM2, newMin, newMax, exposed);
    }

    /** This arm with {@code units} more exposures (units that entered it). */
    public ArmStatistics withExposures(long units) {
        if (units < 0) {
            throw new IllegalArgumentException("exposures must be >= 0, was " + units);
        }
        return new ArmStatistics(count, mean, m2, min, max, Math.addExact(exposed, units));
    }

    /** Chan et al.'s pairwise combination; commutative and associative up to rounding. */
    public ArmStatistics merge(ArmStatistics other) {
        if (other.count == 0) {
            return withExposures(other.exposed);
        }
        if (count == 0) {
            return other.withExposures(exposed);
        }
        long n = count + other.count;
        double d = other.mean - mean;
        double newMean = mean + d * ((double) other.count / n);
        double newM2 = m2 + other.m2 + d * d * ((double) count * other.count / n);
        return new ArmStatistics(n, newMean, newM2, Math.min(min, other.min), Math.max(max, other.max),
                exposed + other.exposed);
    }

    /** Units in the arm: those exposed, or those with an outcome when more outcomes than exposures arrived. */
    public long units() {
        return Math.max(count, exposed);
    }

    /** Exposed units whose outcome has not arrived: {@code max(0, exposed - count)}. */
    public long pending() {
        return units() - count;
    }

    /**
     * Outcomes beyond the reported exposures, {@code max(0, count - exposed)}, when the arm has any
     * exposure at all (without exposures every outcome stands for its own unit, as before).
     */
    public long excessOutcomes() {
        return exposed == 0 ? 0 : Math.max(0, count - exposed);
    }

    /**
     * The arm's units with every pending outcome set to {@code y} (Chan et al.'s merge with
     * {@link #pending()} copies of y): its mean {@code (S + (N - O) * y) / N}, with S the sum of
     * the O observed outcomes and N the units, is an end of the interval in which the arm's mean
     * over all its units lies when y is an end of the outcome range (Horowitz &amp; Manski 2000,
     * JASA 95(449), Sect. 2; Manski 2003, <i>Partial Identification of Probability
     * Distributions</i>, ch. 1). No pending units: this arm, unchanged.
     */
    public ArmStatistics pendingAt(double y) {
        long missing = pending();
        return missing == 0 ? this
                : new ArmStatistics(count, mean, m2, min, max).merge(new ArmStatistics(missing, y, 0.0, y, y));
    }

    /** True when the arm has no observations. */
    public boolean isEmpty() {
        return count == 0;
    }

    /** Sample variance with divisor n - 1; 0 for fewer than two observations. */
    public double variance() {
        return count > 1 ? m2 / (count - 1) : 0.0;
    }

    /** Sample standard deviation with divisor n - 1. */
    public double sd() {
        return Math.sqrt(variance());
    }

    /** Sum of the observations, {@code count * mean}. */
    public double sum() {
        return count * mean;
    }
}
