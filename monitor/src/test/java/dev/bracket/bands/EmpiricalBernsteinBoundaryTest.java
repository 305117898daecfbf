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

    /**
     * The radius is the smallest distance that some grid point rejects, searched here the plain way:
     * every grid point's smaller root of {@code psi t d^2 / c^2 - lambda t d / c + psi M2 / c^2 +
     * ln(1 / (alpha w_k)) = 0}, with the weights the class documents ({@code 1 / (1 + |k - k0|)^2}
     * around the grid point nearest {@code sqrt(32 ln(1/alpha) / plannedCount)}), the least of them
     * and {@code room}. The class tries a data-dependent grid point first and skips others by a lower
     * bound; on seeded random inputs the answers must agree to 1e-12 relative.
     */
    @Test
    @DisplayName("the radius equals the least root over the whole grid, whatever point is tried first")
    void equalsTheLeastRootOverTheGrid() {
        java.util.SplittableRandom rng = new java.util.SplittableRandom(2021_49L);
        for (int i = 0; i < 20_000; i++) {
            double alpha = new double[] {0.05, 0.025, 0.0125, 0.001}[rng.nextInt(4)];
            long planned = new long[] {100, 10_000, 1_000_000}[rng.nextInt(3)];
            EmpiricalBernsteinBoundary boundary = new EmpiricalBernsteinBoundary(alpha, planned);
            long count = 1 + (long) Math.pow(10, 7 * rng.nextDouble());
            double scale = 0.01 + 10 * rng.nextDouble();
            double m2 = count * scale * scale / 4 * Math.pow(rng.nextDouble(), 1 + rng.nextInt(4));
            double room = scale * rng.nextDouble();
            double expected = plainSearch(alpha, planned, count, m2, scale, room);
            double actual = boundary.radius(count, m2, scale, room);
            assertEquals(expected, actual, 1e-12 * Math.max(1e-300, expected),
                    "alpha " + alpha + ", planned " + planned + ", count " + count + ", m2 " + m2 + ", scale " + scale + ", room " + room);
        }
    }

    /** The least root over the whole grid and {@code room}, written from the class's documentation (see above). */
    static double plainSearch(double alpha, long planned, long count, double m2, double scale, double room) {
        int grid = 48;
        double bestLambda = Math.sqrt(32 * Math.log(1 / alpha) / planned);
        int k0 = Math.max(0, Math.min(grid - 1, (int) Math.round(2 * Math.log(0.5 / bestLambda) / Math.log(2))));
        double total = 0;
        for (int k = 0; k < grid; k++) {
            total += 1 / Math.pow(1 + Math.abs(k - k0), 2);
        }
        double best = room;
        for (int k = 0; k < grid; k++) {
            double lambda = 0.5 * Math.pow(2, -k / 2.0);
            double psi = -Math.log1p(-lambda) - lambda;
            double threshold = Math.log(total * Math.pow(1 + Math.abs(k - k0), 2) / alpha);
            double a = psi * count / (scale * scale);
            double b = lambda * count / scale;
            double c = psi * m2 / (scale * scale) + threshold;
            double disc = b * b - 4 * a * c;
            if (disc >= 0) {
                best = Math.min(best, 2 * c / (b + Math.sqrt(disc))); // (b - sqrt(disc)) / (2a) without cancellation
            }
        }
        return best;
    }

    @Test
    void rejectsBadParameters() {
        assertThrows(IllegalArgumentException.class, () -> new EmpiricalBernsteinBoundary(0, 10));
        assertThrows(IllegalArgumentException.class, () -> new EmpiricalBernsteinBoundary(1, 10));
        assertThrows(IllegalArgumentException.class, () -> new EmpiricalBernsteinBoundary(0.05, 0));
    }
}
