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
 */
public record ArmStatistics(long count, double mean, double m2, double min, double max) {

    private static final ArmStatistics EMPTY = new ArmStatistics(0, 0.0, 0.0, Double.NaN, Double.NaN);

    public ArmStatistics {
        if (count < 0) {
            throw new IllegalArgumentException("count must be >= 0, was " + count);
        }
        if (!Double.isFinite(mean) || !Double.isFinite(m2) || m2 < 0) {
            throw new IllegalArgumentException("mean and m2 must be finite and m2 >= 0 (mean=" + mean + ", m2=" + m2 + ")");
        }
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
        return new ArmStatistics(n, newMean, newM2, newMin, newMax);
    }

    /** Chan et al.'s pairwise combination; commutative and associative up to rounding. */
    public ArmStatistics merge(ArmStatistics other) {
        if (other.count == 0) {
            return this;
        }
        if (count == 0) {
            return other;
        }
        long n = count + other.count;
        double d = other.mean - mean;
        double newMean = mean + d * ((double) other.count / n);
        double newM2 = m2 + other.m2 + d * d * ((double) count * other.count / n);
        return new ArmStatistics(n, newMean, newM2, Math.min(min, other.min), Math.max(max, other.max));
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
