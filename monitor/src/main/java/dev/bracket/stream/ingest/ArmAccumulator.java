package dev.bracket.stream.ingest;

import dev.bracket.bounds.ArmStatistics;

/**
 * A mutable twin of {@link ArmStatistics} for the hot path: one arm of one pane, updated in
 * place. The update is the same Welford step as {@link ArmStatistics#add} (Welford 1962), so a
 * stream folded here equals the same stream folded into immutable values bit for bit.
 */
final class ArmAccumulator {

    private long count;
    private double mean;
    private double m2;
    private double min = Double.NaN;
    private double max = Double.NaN;

    void add(double y) {
        long n = count + 1;
        double delta = y - mean;
        double newMean = mean + delta / n;
        m2 = m2 + delta * (y - newMean);
        mean = newMean;
        min = count == 0 ? y : Math.min(min, y);
        max = count == 0 ? y : Math.max(max, y);
        count = n;
    }

    void set(ArmStatistics s) {
        count = s.count();
        mean = s.mean();
        m2 = s.m2();
        min = s.min();
        max = s.max();
    }

    ArmStatistics snapshot() {
        return count == 0 ? ArmStatistics.empty() : new ArmStatistics(count, mean, m2, min, max);
    }
}
