package dev.bracket.bounds;

/**
 * A box of plausible values for one cell's observable quantities: the treated share
 * {@code p in [pLow, pHigh]} and the arm means {@code mu1 in [mu1Low, mu1High]},
 * {@code mu0 in [mu0Low, mu0High]}. A confidence band is the hull of the identified intervals
 * over such a box (see {@code bands.BoxProjection}); the estimates themselves are the box of a
 * single point ({@link #at}).
 */
public record ObservablesBox(double pLow, double pHigh, double mu1Low, double mu1High, double mu0Low, double mu0High) {

    public ObservablesBox {
        if (!(pLow <= pHigh && mu1Low <= mu1High && mu0Low <= mu0High)) {
            throw new IllegalArgumentException("box needs low <= high in every coordinate: " + pLow + ".." + pHigh
                    + ", " + mu1Low + ".." + mu1High + ", " + mu0Low + ".." + mu0High);
        }
    }

    /**
     * The point of a cell's estimates: its treated share and arm means. The mean of an arm with no
     * units is unknown, so it spans the whole range (a constraint on it then restricts nothing).
     */
    public static ObservablesBox at(ObservedArms arms, OutcomeRange range) {
        double p = arms.treatedShare();
        return new ObservablesBox(p, p,
                arms.treated().isEmpty() ? range.min() : arms.treated().mean(),
                arms.treated().isEmpty() ? range.max() : arms.treated().mean(),
                arms.control().isEmpty() ? range.min() : arms.control().mean(),
                arms.control().isEmpty() ? range.max() : arms.control().mean());
    }

    /** The box around estimates with the given half-widths, clipped to [0, 1] and the outcome range. */
    public static ObservablesBox around(double p, double pRadius, double mu1, double mu1Radius, double mu0, double mu0Radius,
                                 OutcomeRange range) {
        return new ObservablesBox(
                Math.max(0, p - pRadius), Math.min(1, p + pRadius),
                Math.max(range.min(), mu1 - mu1Radius), Math.min(range.max(), mu1 + mu1Radius),
                Math.max(range.min(), mu0 - mu0Radius), Math.min(range.max(), mu0 + mu0Radius));
    }

    /**
     * The (mu1, mu0) pairs where an end of the interval can take its extreme value over the box:
     * the four corners, and the points where the diagonal {@code mu1 = mu0} crosses the box's
     * edges. Every constraint of every assumption compares an unobserved mean with a, b, mu1 or mu0
     * (see {@code Assumption}), so for fixed p the ends are linear on each side of the diagonal
     * within [a, b]^2, and the assumptions are refuted exactly on one side of it, on both sides,
     * or nowhere. The extremes over the box, and over its part compatible with the assumptions,
     * are therefore attained among these points.
     */
    public double[][] meanVertices() {
        double[][] out = new double[8][];
        int k = 0;
        out[k++] = new double[] {mu1Low, mu0Low};
        out[k++] = new double[] {mu1Low, mu0High};
        out[k++] = new double[] {mu1High, mu0Low};
        out[k++] = new double[] {mu1High, mu0High};
        double from = Math.max(mu1Low, mu0Low);
        double to = Math.min(mu1High, mu0High);
        for (double m : new double[] {mu1Low, mu1High, mu0Low, mu0High}) {
            if (m >= from && m <= to) {
                out[k++] = new double[] {m, m};
            }
        }
        return java.util.Arrays.copyOf(out, k);
    }
}
