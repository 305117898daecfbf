package dev.bracket.bounds;

import net.jqwik.api.Arbitraries;
import net.jqwik.api.Arbitrary;

import java.util.Arrays;
import java.util.LinkedHashMap;
import java.util.Map;

/**
 * Test data: counts of units per instrument level z, arm t and binary outcome y,
 * {@code counts[z][t][y]}, with the outcome y = 0 meaning the range's min and y = 1 its max.
 */
record InstrumentLevelCounts(int[][][] counts) {

    /**
     * Random counts from 0 to {@code maxCount} per cell, for {@code minLevels} to {@code maxLevels}
     * levels, every level with units and both arms with units somewhere.
     */
    static Arbitrary<InstrumentLevelCounts> arbitrary(int minLevels, int maxLevels, int maxCount) {
        Arbitrary<int[]> cell = Arbitraries.integers().between(0, maxCount).array(int[].class).ofSize(2);
        return Arbitraries.integers().between(minLevels, maxLevels)
                .flatMap(k -> cell.array(int[][].class).ofSize(2).array(int[][][].class).ofSize(k))
                .map(InstrumentLevelCounts::new)
                .filter(InstrumentLevelCounts::usable);
    }

    private boolean usable() {
        long treated = 0;
        long control = 0;
        for (int z = 0; z < levels(); z++) {
            if (total(z) == 0) {
                return false;
            }
            treated += counts[z][1][0] + counts[z][1][1];
            control += counts[z][0][0] + counts[z][0][1];
        }
        return treated > 0 && control > 0;
    }

    int levels() {
        return counts.length;
    }

    long total(int z) {
        return counts[z][0][0] + counts[z][0][1] + counts[z][1][0] + counts[z][1][1];
    }

    /** The arms per level as a stream would build them, one Welford update per unit; levels named z0, z1, ... */
    Map<String, ObservedArms> arms(OutcomeRange range) {
        Map<String, ObservedArms> levels = new LinkedHashMap<>();
        for (int z = 0; z < counts.length; z++) {
            ObservedArms arms = ObservedArms.empty();
            for (int t = 0; t < 2; t++) {
                for (int y = 0; y < 2; y++) {
                    for (int u = 0; u < counts[z][t][y]; u++) {
                        arms = arms.add(t == 1, y == 1 ? range.max() : range.min());
                    }
                }
            }
            levels.put("z" + z, arms);
        }
        return levels;
    }

    /** P(T = t, Y = y | Z = z) as exact ratios of the counts (a level with no units gives zeros). */
    double[][][] probabilities() {
        double[][][] p = new double[counts.length][2][2];
        for (int z = 0; z < counts.length; z++) {
            double n = total(z);
            for (int t = 0; t < 2; t++) {
                for (int y = 0; y < 2; y++) {
                    p[z][t][y] = n == 0 ? 0 : counts[z][t][y] / n;
                }
            }
        }
        return p;
    }

    /**
     * Pearl's (1995) instrumental inequality, {@code max_t sum_y max_z P(Y = y, T = t | Z = z) <= 1},
     * decided in exact integer arithmetic: for each t the level maximising each cell is found by
     * cross-multiplying, then {@code c_a / n_a + c_b / n_b <= 1} is {@code c_a n_b + c_b n_a <= n_a n_b}.
     */
    boolean instrumentalInequalityHolds() {
        for (int t = 0; t < 2; t++) {
            int[] best = new int[2];
            for (int y = 0; y < 2; y++) {
                for (int z = 1; z < counts.length; z++) {
                    if ((long) counts[z][t][y] * total(best[y]) > (long) counts[best[y]][t][y] * total(z)) {
                        best[y] = z;
                    }
                }
            }
            long na = total(best[0]);
            long nb = total(best[1]);
            if ((long) counts[best[0]][t][0] * nb + (long) counts[best[1]][t][1] * na > na * nb) {
                return false;
            }
        }
        return true;
    }

    @Override
    public String toString() {
        return "counts[z][t][y] " + Arrays.deepToString(counts);
    }
}
