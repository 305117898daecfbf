package dev.bracket.bands;

import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

class EmpiricalBernsteinBoundaryTest {

    /**
     * Fan, Grama &amp; Liu (2015), Electron. J. Probab. 20(1), Lemma 4.1 (recalled from memory): for
     * {@code xi >= -1} and {@code 0 <= lambda < 1}, {@code exp(lambda xi - psi(lambda) xi^2) <= 1 + lambda xi}.
     * The boundary's validity rests on it, so it is checked here on a dense grid, including the
     * equality at {@code xi = -1} and {@code xi = 0}.
     */
    @Test
    @DisplayName("Fan et al.'s inequality holds on a dense grid of lambda and xi >= -1")
    void fanInequality() {
        for (int i = 1; i <= 99; i++) {
            double lambda = i / 100.0;
            double psi = EmpiricalBernsteinBoundary.psi(lambda);
            for (double xi = -1; xi <= 50; xi += 0.01) {
                double left = Math.exp(lambda * xi - psi * xi * xi);
                assertTrue(left <= (1 + lambda * xi) * (1 + 1e-12) + 1e-15, "lambda=" + lambda + ", xi=" + xi);
            }
            assertEquals(1 - lambda, Math.exp(-lambda - psi), 1e-12, "equality at xi = -1");
        }
    }

    @Test
    @DisplayName("the grid stays where the rejected means form one interval (lambda <= 1/2)")
    void gridWithinMonotoneRange() {
        assertEquals(0.5, EmpiricalBernsteinBoundary.lambda(0), 0);
        for (int k = 0; k < 48; k++) {
            double lambda = EmpiricalBernsteinBoundary.lambda(k);
            // vertex of lambda d - psi d^2 (scale 1) at lambda / (2 psi) must lie at or beyond d = 1
            assertTrue(lambda / (2 * EmpiricalBernsteinBoundary.psi(lambda)) >= 1, "k = " + k);
        }
    }

    @Test
    @DisplayName("the radius adapts to the spread: concentrated data give a far narrower bound than the widest law")
    void adaptsToSpread() {
        EmpiricalBernsteinBoundary b = new EmpiricalBernsteinBoundary(0.025, 10_000);
        long n = 10_000;
        double widest = b.radius(n, n * 0.25, 1, 1); // fair coin: variance 1/4
        double concentrated = b.radius(n, n * 0.0025, 1, 1); // sd 0.05
        // Bernstein-type bounds scale with the standard deviation, plus a range term of order 1/n: 10x less spread,
        // clearly more than 5x narrower (common practice, no source for the factor).
        assertTrue(concentrated < widest / 5, concentrated + " vs " + widest);
        // Never narrower than the one-look normal radius z(1 - alpha) sd / sqrt(n) of the same law (alpha = 0.025: z = 1.96).
        assertTrue(widest > 1.96 * 0.5 / Math.sqrt(n) && concentrated > 1.96 * 0.05 / Math.sqrt(n));
        assertEquals(0.3, b.radius(0, 0, 1, 0.3), 0, "no data: the whole room");
        assertEquals(0, b.radius(10, 0, 0, 1), 0, "a constant quantity is known exactly");
        double previous = Double.POSITIVE_INFINITY;
        for (long m = 10; m <= 10_000_000; m *= 10) {
            double r = b.radius(m, m * 0.25, 1, 1);
            assertTrue(r < previous, "radius must shrink at n = " + m);
            previous = r;
        }
    }

    @Test
    void rejectsBadParameters() {
        assertThrows(IllegalArgumentException.class, () -> new EmpiricalBernsteinBoundary(0, 10));
        assertThrows(IllegalArgumentException.class, () -> new EmpiricalBernsteinBoundary(1, 10));
        assertThrows(IllegalArgumentException.class, () -> new EmpiricalBernsteinBoundary(0.05, 0));
    }
}
