package dev.bracket.bands;

import org.apache.commons.math3.analysis.solvers.BrentSolver;
import org.apache.commons.math3.distribution.NormalDistribution;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;
import org.junit.jupiter.api.Test;

import java.util.SplittableRandom;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

class ImbensManskiTest {

    private static final NormalDistribution N01 = new NormalDistribution(0, 1);

    // Imbens & Manski (2004), Econometrica 72(6), §4: C solves Phi(C + sqrt(N) Delta / max sigma) - Phi(-C) = 1 - alpha.
    // Expected values computed from that equation with an independent solver (SciPy brentq on scipy.stats.norm),
    // and re-checked below by the residual of the equation with Commons Math's NormalDistribution.
    @ParameterizedTest(name = "alpha = 0.05, sqrt(N) Delta / max sigma = {0}: C = {1}")
    @CsvSource({
            "0,    1.959964",
            "0.5,  1.769713",
            "1,    1.681477",
            "2,    1.646146",
            "1e6,  1.644854"})
    @DisplayName("critical values match the paper's equation")
    void criticalValuesAtFivePercent(double scaledWidth, double expected) {
        double c = ImbensManski.criticalValue(0.95, scaledWidth);
        assertEquals(expected, c, 1e-5);
        double residual = N01.cumulativeProbability(c + scaledWidth) - N01.cumulativeProbability(-c) - 0.95;
        assertEquals(0, residual, 1e-12);
    }

    @Test
    @DisplayName("C runs from the two-sided to the one-sided normal quantile as the interval widens")
    void criticalValueLimits() {
        // z(0.975) and z(0.95) from Commons Math: point identification versus a long interval.
        assertEquals(N01.inverseCumulativeProbability(0.975), ImbensManski.criticalValue(0.95, 0), 1e-10);
        assertEquals(N01.inverseCumulativeProbability(0.95), ImbensManski.criticalValue(0.95, Double.POSITIVE_INFINITY), 1e-12);
        double previous = Double.POSITIVE_INFINITY;
        for (double x = 0; x <= 6; x += 0.25) {
            double c = ImbensManski.criticalValue(0.95, x);
            assertTrue(c < previous, "C must fall as the scaled width grows, at " + x);
            previous = c;
        }
    }

    @Test
    @DisplayName("a short interval falls back to the two-sided value on both sides (Stoye's pre-test)")
    void shortIntervalUsesConservativeValue() {
        // Width 0.01 with standard errors 0.02 at N = 1000: width / se = 0.5 < sqrt(ln 1000) = 2.63,
        // so the width is treated as 0 and C = z(0.975).
        double[] band = ImbensManski.interval(0.0, 0.01, 0.02, 0.02, 0.95, 1000);
        double z = N01.inverseCumulativeProbability(0.975);
        assertEquals(-z * 0.02, band[0], 1e-12);
        assertEquals(0.01 + z * 0.02, band[1], 1e-12);
    }

    @Test
    @DisplayName("a long interval uses the Imbens-Manski value for its estimated width, found by the root finder")
    void longIntervalUsesEstimatedWidth() {
        // Width 0.04, standard errors 0.02 and 0.01 at N = 20: width / max se = 2 > sqrt(ln 20) = 1.73,
        // so the estimated width is used, and x = 2 is short of the far tail where C is z(0.95)
        // without solving: the value must come from the root finder. C = 1.646146 is the x = 2 row
        // of the table above (SciPy brentq), which lies strictly between z(0.95) and z(0.975).
        double[] band = ImbensManski.interval(-0.02, 0.02, 0.02, 0.01, 0.95, 20);
        double expected = 1.646146;
        assertEquals(-0.02 - expected * 0.02, band[0], 1e-6 * 0.02);
        assertEquals(0.02 + expected * 0.01, band[1], 1e-6 * 0.01);
        double c = (-0.02 - band[0]) / 0.02;
        assertEquals(0, N01.cumulativeProbability(c + 2) - N01.cumulativeProbability(-c) - 0.95, 1e-12);
        assertTrue(c > N01.inverseCumulativeProbability(0.95) + 1e-3 && c < N01.inverseCumulativeProbability(0.975) - 1e-3,
                "C = " + c + " must lie strictly between the one- and two-sided normal quantiles");
    }

    /** The critical value as computed before the grid: Brent's method on the paper's equation at every call. */
    private static double bracketedRoot(double level, double x) {
        double oneSided = N01.inverseCumulativeProbability(level);
        double twoSided = N01.inverseCumulativeProbability((1 + level) / 2);
        if (oneSided + x >= 9) {
            return oneSided;
        }
        return new BrentSolver(1e-14, 1e-13).solve(200,
                c -> N01.cumulativeProbability(c + x) - N01.cumulativeProbability(-c) - level, oneSided - 1e-9, twoSided + 1e-9);
    }

    @Test
    @DisplayName("the grid-and-Newton critical value equals a root search at every call within 1e-12 (random levels and widths)")
    void sameAsRootSearchAtEveryCall() {
        SplittableRandom rng = new SplittableRandom(12);
        double[] levels = {0.5, 0.8, 0.9, 0.95, 0.99, 0.999, 0.3 + 0.69 * rng.nextDouble()};
        for (double level : levels) {
            for (int i = 0; i < 2_000; i++) {
                // Widths on every scale, grid points themselves, and the far end where C is the one-sided value.
                double x = switch (i % 4) {
                    case 0 -> rng.nextDouble() * 10;
                    case 1 -> Math.exp(rng.nextDouble() * 12 - 10);
                    case 2 -> rng.nextInt(300) / 32.0;
                    default -> rng.nextDouble() * 0.1;
                };
                double expected = bracketedRoot(level, x);
                double c = ImbensManski.criticalValue(level, x);
                assertEquals(expected, c, 1e-12 * Math.max(1, Math.abs(expected)), "level " + level + ", x " + x);
            }
        }
    }
}
