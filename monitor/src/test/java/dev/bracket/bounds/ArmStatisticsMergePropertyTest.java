package dev.bracket.bounds;

import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.SplittableRandom;
import java.util.function.BinaryOperator;

import static org.junit.jupiter.api.Assertions.assertEquals;

/**
 * Chan, Golub &amp; LeVeque's pairwise merge (1979/1983) must agree with one Welford pass
 * (Welford 1962) over all observations, whatever the partition and the merge order: this is what
 * lets partial statistics from many stream partitions be added in any order.
 */
class ArmStatisticsMergePropertyTest {

    /** Seed of the generated cases; with the case number in a failure's name it replays the case. */
    private static final long SEED = 0x5EED_1979L;
    private static final List<Split> CASES = SeededCases.generate(SEED, 300, Split::random);

    /**
     * Observations dealt to partitions and merged in a random tree.
     *
     * @param mergeSeed drives the dealing and the merge order
     */
    record Split(double[] observations, int partitions, long mergeSeed) {

        /** 1 to 300 observations at several scales, with many exact repeats so that zero spreads occur too. */
        static Split random(SplittableRandom r) {
            double[] ys = new double[1 + r.nextInt(300)];
            for (int i = 0; i < ys.length; i++) {
                ys[i] = switch (r.nextInt(3)) {
                    case 0 -> r.nextDouble(-1000, 1000);
                    case 1 -> r.nextInt(4);
                    default -> r.nextDouble(1e6, 1e6 + 1);
                };
            }
            return new Split(ys, 1 + r.nextInt(12), r.nextLong());
        }

        @Override
        public String toString() {
            return observations.length + " observations " + Arrays.toString(Arrays.copyOf(observations, Math.min(4, observations.length)))
                    + "..., " + partitions + " partitions, merge seed " + mergeSeed;
        }
    }

    static List<Split> cases() {
        return CASES;
    }

    @ParameterizedTest(name = "seed " + SEED + ", case {index}: {0}")
    @MethodSource("cases")
    @DisplayName("merging partitions in any order equals one pass")
    void mergingPartitionsInAnyOrderEqualsOnePass(Split split) {
        mergeEqualsOnePass(split, ArmStatistics::merge);
    }

    @Test
    @DisplayName("the check fails for a merge that drops the between-partition term d^2 nA nB / n")
    void failsForAMergeWithoutTheCrossTerm() {
        BinaryOperator<ArmStatistics> withoutCrossTerm = (a, b) -> {
            if (a.isEmpty() || b.isEmpty()) {
                return a.isEmpty() ? b : a;
            }
            long n = a.count() + b.count();
            double mean = a.mean() + (b.mean() - a.mean()) * b.count() / n;
            return new ArmStatistics(n, mean, a.m2() + b.m2(), Math.min(a.min(), b.min()), Math.max(a.max(), b.max()));
        };
        SeededCases.assertRejectsSome(CASES, s -> mergeEqualsOnePass(s, withoutCrossTerm), "merge without the cross term");
    }

    static void mergeEqualsOnePass(Split split, BinaryOperator<ArmStatistics> merge) {
        SplittableRandom random = new SplittableRandom(split.mergeSeed());
        List<ArmStatistics> parts = new ArrayList<>();
        for (int i = 0; i < split.partitions(); i++) {
            parts.add(ArmStatistics.empty());
        }
        for (double y : split.observations()) {
            int k = random.nextInt(split.partitions());
            parts.set(k, parts.get(k).add(y));
        }
        // Random merge tree: repeatedly merge two random summaries, in random operand order.
        while (parts.size() > 1) {
            ArmStatistics a = parts.remove(random.nextInt(parts.size()));
            ArmStatistics b = parts.remove(random.nextInt(parts.size()));
            parts.add(random.nextBoolean() ? merge.apply(a, b) : merge.apply(b, a));
        }
        ArmStatistics merged = parts.get(0);

        double[] all = split.observations();
        ArmStatistics onePass = ArmStatistics.of(all);
        double scale = Arrays.stream(all).map(Math::abs).max().orElse(0);

        assertEquals(onePass.count(), merged.count());
        assertEquals(onePass.min(), merged.min());
        assertEquals(onePass.max(), merged.max());
        assertEquals(onePass.mean(), merged.mean(), 1e-12 * Math.max(Math.abs(onePass.mean()), scale) + Double.MIN_VALUE);
        // Relative 1e-12, plus what storing values of magnitude `scale` in binary already costs
        // (about one ulp of the data per observation, times the spread) for offset data.
        double spread = onePass.max() - onePass.min();
        assertEquals(onePass.m2(), merged.m2(), 1e-12 * onePass.m2() + 4 * all.length * Math.ulp(scale) * spread);
    }
}
