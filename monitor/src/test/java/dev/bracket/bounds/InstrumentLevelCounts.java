package dev.bracket.bounds;

import java.util.Arrays;
import java.util.LinkedHashMap;
import java.util.Map;
import java.util.SplittableRandom;

/**
 * Test data: counts of units per instrument level z, arm t and binary outcome y,
 * {@code counts[z][t][y]}, with the outcome y = 0 meaning the range's min and y = 1 its max.
 */
record InstrumentLevelCounts(int[][][] counts) {

    /**
     * Random counts from 0 to {@code maxCount} per cell, for {@code minLevels} to {@code maxLevels}
     * levels, every level with units and both arms with units somewhere. One time in four one
     * level's arm is left empty (one-sided non-compliance, as in trials where the control level
     * cannot get treatment): that arm's two cells then sum to 1, so the instrumental inequality
     * holds, if at all, with equality. Unusable draws are drawn again.
     */
    static InstrumentLevelCounts random(SplittableRandom r, int minLevels, int maxLevels, int maxCount) {
        while (true) {
            int[][][] counts = new int[r.nextInt(minLevels, maxLevels + 1)][2][2];
            for (int[][] level : counts) {
                for (int[] arm : level) {
                    arm[0] = r.nextInt(maxCount + 1);
                    arm[1] = r.nextInt(maxCount + 1);
                }
            }
            if (r.nextInt(4) == 0) {
                Arrays.fill(counts[r.nextInt(counts.length)][r.nextInt(2)], 0);
            }
            InstrumentLevelCounts data = new InstrumentLevelCounts(counts);
            if (data.usable()) {
                return data;
            }
        }
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
     * Pearl's (1995) instrumental inequality, {@code max_t sum_y max_z P(Y = y, T = t | Z = z) <= 1}:
     * whether it holds.
     */
    boolean instrumentalInequalityHolds() {
        return instrumentalInequalitySign() <= 0;
    }

    /**
     * The sign of {@code max_t sum_y max_z P(Y = y, T = t | Z = z) - 1}: -1 if the instrumental
     * inequality holds strictly, 0 if with equality, 1 if it fails. Decided in exact integer
     * arithmetic: for each t the level maximising each cell is found by cross-multiplying, then
     * {@code c_a / n_a + c_b / n_b} is compared with 1 as {@code c_a n_b + c_b n_a} with {@code n_a n_b}.
     */
    int instrumentalInequalitySign() {
        int sign = -1;
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
            sign = Math.max(sign, Long.signum((long) counts[best[0]][t][0] * nb + (long) counts[best[1]][t][1] * na - na * nb));
        }
        return sign;
    }

    /** Whether some level has units in one arm only (one-sided non-compliance at that level). */
    boolean someLevelWithOneArm() {
        for (int[][] level : counts) {
            boolean control = level[0][0] + level[0][1] > 0;
            boolean treated = level[1][0] + level[1][1] > 0;
            if (control != treated) {
                return true;
            }
        }
        return false;
    }

    @Override
    public String toString() {
        return "counts[z][t][y] " + Arrays.deepToString(counts);
    }
}
