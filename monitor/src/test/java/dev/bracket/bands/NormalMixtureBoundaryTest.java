package dev.bracket.bands;

import org.apache.commons.math3.analysis.integration.IterativeLegendreGaussIntegrator;
import org.apache.commons.math3.optim.MaxEval;
import org.apache.commons.math3.optim.nonlinear.scalar.GoalType;
import org.apache.commons.math3.optim.univariate.BrentOptimizer;
import org.apache.commons.math3.optim.univariate.SearchInterval;
import org.apache.commons.math3.optim.univariate.UnivariateObjectiveFunction;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

class NormalMixtureBoundaryTest {

    /**
     * The normal mixture of exp(lambda S - lambda^2 V / 2) over lambda ~ N(0, 1/rho)
     * (Howard et al. 2021, Ann. Statist. 49(2), §3; Robbins 1970), integrated numerically with
     * Commons Math. At S = u(V) it must equal exactly 1/alpha, the threshold of Ville's inequality.
     */
    @ParameterizedTest(name = "alpha={0}, rho={1}, v={2}")
    @CsvSource({"0.05, 100, 10", "0.0166667, 2500, 2500", "0.001, 3, 40000", "0.1, 0.5, 0.25"})
    @DisplayName("the closed-form boundary is where the mixture martingale reaches 1/alpha")
    void boundaryIsWhereMixtureHitsThreshold(double alpha, double rho, double v) {
        NormalMixtureBoundary b = new NormalMixtureBoundary(alpha, rho);
        double s = b.boundary(v);
        double centre = s / (v + rho);
        double spread = 1 / Math.sqrt(v + rho);
        // Integrand scaled by exp(-S^2 / (2 (V + rho))) so it peaks at 1; the factor is restored afterwards.
        double scaled = new IterativeLegendreGaussIntegrator(32, 1e-13, 1e-13).integrate(10_000,
                lambda -> Math.sqrt(rho / (2 * Math.PI))
                        * Math.exp(-(v + rho) / 2 * (lambda - centre) * (lambda - centre)),
                centre - 40 * spread, centre + 40 * spread);
        double mixture = scaled * Math.exp(s * s / (2 * (v + rho)));
        assertEquals(1 / alpha, mixture, 1e-8 / alpha);
    }

    @Test
    @DisplayName("the tuned rho minimises the boundary at the planned count (Commons Math BrentOptimizer)")
    void tunedRhoMinimisesBoundaryAtPlannedCount() {
        double alpha = 0.05 / 3;
        long planned = 10_000;
        double v = planned / 4.0;
        double rho = NormalMixtureBoundary.tunedFor(alpha, planned).rho();
        double bestLogRho = new BrentOptimizer(1e-12, 1e-14).optimize(new MaxEval(500),
                new UnivariateObjectiveFunction(logRho -> new NormalMixtureBoundary(alpha, Math.exp(logRho)).boundary(v)),
                GoalType.MINIMIZE, new SearchInterval(-10, 20)).getPoint();
        assertEquals(Math.exp(bestLogRho), rho, 1e-4 * rho);
    }

    @Test
    @DisplayName("the radius shrinks like sqrt(log n / n) and is infinite with no observations")
    void radiusShrinks() {
        NormalMixtureBoundary b = NormalMixtureBoundary.tunedFor(0.05, 1000);
        assertEquals(Double.POSITIVE_INFINITY, b.radius(0));
        double previous = Double.POSITIVE_INFINITY;
        for (long n = 1; n <= 10_000_000; n *= 10) {
            double r = b.radius(n);
            assertTrue(r < previous, "radius must shrink at n = " + n);
            previous = r;
        }
        // Wider than the fixed-sample Hoeffding radius sqrt(ln(2/alpha) / (2n)) (Hoeffding 1963) at every n:
        // a time-uniform band cannot beat the one-look bound.
        for (long n = 10; n <= 1_000_000; n *= 10) {
            assertTrue(b.radius(n) > Math.sqrt(Math.log(2 / 0.05) / (2.0 * n)), "at n = " + n);
        }
    }

    @Test
    void rejectsBadParameters() {
        assertThrows(IllegalArgumentException.class, () -> new NormalMixtureBoundary(0, 1));
        assertThrows(IllegalArgumentException.class, () -> new NormalMixtureBoundary(0.05, 0));
        assertThrows(IllegalArgumentException.class, () -> NormalMixtureBoundary.tunedFor(0.05, 0));
    }
}
