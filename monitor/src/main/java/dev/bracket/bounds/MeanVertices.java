package dev.bracket.bounds;

import java.util.Arrays;

/**
 * The (mu1, mu0) pairs of a box [mu1Low, mu1High] × [mu0Low, mu0High] of arm means where an end
 * of the ATE interval can take its extreme value over the box: the four corners, and the points
 * where the diagonal {@code mu1 = mu0} crosses the box's edges.
 *
 * <p>Why these suffice: every constraint of every assumption compares an unobserved mean with a,
 * b, mu1 or mu0 (see {@link Assumption}), so for fixed p the ends are linear on each side of the
 * diagonal within [a, b]², and the assumptions are refuted exactly on one side of it, on both
 * sides, or nowhere. The extremes over the box, and over its part compatible with the
 * assumptions, are therefore attained at vertices of those polygons, which are these points.
 * A {@code NaN} end (an arm with no units) gives no diagonal points.
 */
public final class MeanVertices {

    private MeanVertices() {
    }

    /** Corners first, then the diagonal points; duplicates are harmless. */
    public static double[][] of(double mu1Low, double mu1High, double mu0Low, double mu0High) {
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
        return Arrays.copyOf(out, k);
    }
}
