package dev.bracket.bands;

import org.apache.commons.math3.distribution.BetaDistribution;
import org.apache.commons.math3.random.RandomGenerator;

/** A law of outcomes in [0, 1] with a known mean, for simulations with known truth. */
interface OutcomeLaw {

    double mean();

    /** The law's variance (for the Beta law Commons Math's numerical variance, ab / ((a + b)^2 (a + b + 1))). */
    double variance();

    double draw(RandomGenerator rng);

    /** Binary outcomes with success probability m. */
    static OutcomeLaw bernoulli(double m) {
        return new OutcomeLaw() {
            public double mean() {
                return m;
            }

            public double variance() {
                return m * (1 - m);
            }

            public double draw(RandomGenerator rng) {
                return rng.nextDouble() < m ? 1.0 : 0.0;
            }

            public String toString() {
                return "Bernoulli(" + m + ")";
            }
        };
    }

    /** Beta(a, b) outcomes, mean a / (a + b), drawn with Commons Math. */
    static OutcomeLaw beta(double a, double b) {
        return new OutcomeLaw() {
            private BetaDistribution distribution;
            private RandomGenerator boundTo;

            public double mean() {
                return a / (a + b);
            }

            public double variance() {
                return new BetaDistribution(a, b).getNumericalVariance();
            }

            public double draw(RandomGenerator rng) {
                // Building the distribution is costly; keep one per generator.
                if (boundTo != rng) {
                    distribution = new BetaDistribution(rng, a, b);
                    boundTo = rng;
                }
                return distribution.sample();
            }

            public String toString() {
                return "Beta(" + a + ", " + b + ")";
            }
        };
    }
}
