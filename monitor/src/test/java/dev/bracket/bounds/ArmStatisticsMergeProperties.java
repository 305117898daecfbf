package dev.bracket.bounds;

import net.jqwik.api.Arbitraries;
import net.jqwik.api.Arbitrary;
import net.jqwik.api.ForAll;
import net.jqwik.api.From;
import net.jqwik.api.Property;
import net.jqwik.api.Provide;
import net.jqwik.api.constraints.IntRange;
import net.jqwik.api.constraints.Size;

import java.util.ArrayList;
import java.util.List;
import java.util.Random;

import static org.junit.jupiter.api.Assertions.assertEquals;

/**
 * Chan, Golub &amp; LeVeque's pairwise merge (1979/1983) must agree with one Welford pass
 * (Welford 1962) over all observations, whatever the partition and the merge order: this is what
 * lets partial statistics from many stream partitions be added in any order.
 */
class ArmStatisticsMergeProperties {

    @Property(tries = 300)
    void mergingPartitionsInAnyOrderEqualsOnePass(
            @ForAll @Size(min = 1, max = 300) List<@From("observations") Double> observations,
            @ForAll @IntRange(min = 1, max = 12) int partitions,
            @ForAll long seed) {
        Random random = new Random(seed);
        List<ArmStatistics> parts = new ArrayList<>();
        for (int i = 0; i < partitions; i++) {
            parts.add(ArmStatistics.empty());
        }
        for (double y : observations) {
            int k = random.nextInt(partitions);
            parts.set(k, parts.get(k).add(y));
        }
        // Random merge tree: repeatedly merge two random summaries, in random operand order.
        while (parts.size() > 1) {
            ArmStatistics a = parts.remove(random.nextInt(parts.size()));
            ArmStatistics b = parts.remove(random.nextInt(parts.size()));
            parts.add(random.nextBoolean() ? a.merge(b) : b.merge(a));
        }
        ArmStatistics merged = parts.get(0);

        double[] all = observations.stream().mapToDouble(Double::doubleValue).toArray();
        ArmStatistics onePass = ArmStatistics.of(all);
        double scale = observations.stream().mapToDouble(Math::abs).max().orElse(0);

        assertEquals(onePass.count(), merged.count());
        assertEquals(onePass.min(), merged.min());
        assertEquals(onePass.max(), merged.max());
        assertEquals(onePass.mean(), merged.mean(), 1e-12 * Math.max(Math.abs(onePass.mean()), scale) + Double.MIN_VALUE);
        // Relative 1e-12, plus what storing values of magnitude `scale` in binary already costs
        // (about one ulp of the data per observation, times the spread) for offset data.
        double spread = onePass.max() - onePass.min();
        assertEquals(onePass.m2(), merged.m2(), 1e-12 * onePass.m2() + 4 * all.length * Math.ulp(scale) * spread);
    }

    /** Observations at several scales, with many exact repeats so that zero spreads occur too. */
    @Provide
    Arbitrary<Double> observations() {
        return Arbitraries.oneOf(
                Arbitraries.doubles().between(-1000, 1000).ofScale(9),
                Arbitraries.integers().between(0, 3).map(i -> (double) i),
                Arbitraries.doubles().between(1e6, 1e6 + 1).ofScale(9));
    }
}
