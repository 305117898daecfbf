package dev.bracket.bands;

import dev.bracket.bounds.MeanVertices;
import dev.bracket.bounds.OutcomeRange;

/**
 * A box of plausible values for one cell's observable quantities: the treated share
 * {@code p in [pLow, pHigh]} and the arm means {@code mu1 in [mu1Low, mu1High]},
 * {@code mu0 in [mu0Low, mu0High]}. A confidence band is the hull of the identified intervals
 * over such a box (see {@link BoxProjection}).
 */
record ObservablesBox(double pLow, double pHigh, double mu1Low, double mu1High, double mu0Low, double mu0High) {

    ObservablesBox {
        if (!(pLow <= pHigh && mu1Low <= mu1High && mu0Low <= mu0High)) {
            throw new IllegalArgumentException("box needs low <= high in every coordinate: " + pLow + ".." + pHigh
                    + ", " + mu1Low + ".." + mu1High + ", " + mu0Low + ".." + mu0High);
        }
    }

    /** The box around estimates with the given half-widths, clipped to [0, 1] and the outcome range. */
    static ObservablesBox around(double p, double pRadius, double mu1, double mu1Radius, double mu0, double mu0Radius,
                                 OutcomeRange range) {
        return new ObservablesBox(
                Math.max(0, p - pRadius), Math.min(1, p + pRadius),
                Math.max(range.min(), mu1 - mu1Radius), Math.min(range.max(), mu1 + mu1Radius),
                Math.max(range.min(), mu0 - mu0Radius), Math.min(range.max(), mu0 + mu0Radius));
    }

    /** The (mu1, mu0) pairs where an end can take its extreme over the box: see {@link MeanVertices}. */
    double[][] meanVertices() {
        return MeanVertices.of(mu1Low, mu1High, mu0Low, mu0High);
    }
}
