package dev.bracket.bounds;

import org.apache.commons.math3.optim.linear.LinearConstraint;
import org.apache.commons.math3.optim.linear.LinearObjectiveFunction;
import org.apache.commons.math3.optim.linear.NoFeasibleSolutionException;
import org.apache.commons.math3.optim.linear.Relationship;
import org.apache.commons.math3.optim.nonlinear.scalar.GoalType;

import java.util.ArrayList;
import java.util.List;
import java.util.Optional;
import java.util.Set;

/**
 * The ATE under an independent instrument computed the long way, written in the test from the
 * meaning of the assumptions and independent of the engine's {@code ResponseTypeProgram}: a
 * linear program over the joint law {@code x(y0, y1, d)} of the two potential outcomes (values a
 * or b) and the vector {@code d = (T(z_1), ..., T(z_K))} of potential treatments, one per level.
 * Independence of Z from (d, Y0, Y1) makes the law the same at every level, and the unit assigned
 * z shows {@code T = d_z} and {@code Y = Y_{d_z}}, so every observed cell is a sum of x:
 *
 * <pre>
 *   P(T = t, Y = y | Z = z) = sum of x(y0, y1, d) over d_z = t and Y_t = y
 * </pre>
 *
 * Every cell of every level is an equation here (the engine instead uses shares and
 * cross-multiplied means), variables are laid out outcome-major (the engine: treatments-major),
 * and the objective is in outcome units. Solved with Commons Math 3.6.1's older simplex solver ({@link OlderSimplex}).
 */
final class PotentialTreatmentsProgram {

    static final double TOLERANCE = 1e-9;

    private final double a;
    private final double b;
    private final int levels;
    /** cells[z][t][y] = P(T = t, Y = y | Z = z), y = 0 for the outcome a and 1 for b. */
    private final double[][][] cells;

    PotentialTreatmentsProgram(double a, double b, double[][][] cells) {
        this.a = a;
        this.b = b;
        this.levels = cells.length;
        this.cells = cells;
    }

    private int vectors() {
        return 1 << levels;
    }

    private int index(int y0, int y1, int d) {
        return (y0 * 2 + y1) * vectors() + d;
    }

    /** d_z: whether the vector d takes treatment at level z (level 0 is the highest bit). */
    private int taken(int d, int z) {
        return (d >>> (levels - 1 - z)) & 1;
    }

    private double value(int y) {
        return y == 1 ? b : a;
    }

    /** [min, max] of E[Y1 - Y0] in outcome units; empty when no joint law fits. */
    Optional<double[]> ateRange(Set<Assumption> assumptions, Direction better) {
        int n = 4 * vectors();
        double[] gain = new double[n];
        for (int y0 = 0; y0 < 2; y0++) {
            for (int y1 = 0; y1 < 2; y1++) {
                for (int d = 0; d < vectors(); d++) {
                    gain[index(y0, y1, d)] = value(y1) - value(y0);
                }
            }
        }
        List<LinearConstraint> constraints = constraints(assumptions, better);
        LinearObjectiveFunction objective = new LinearObjectiveFunction(gain, 0);
        try {
            return Optional.of(new double[] {solve(objective, constraints, GoalType.MINIMIZE),
                    solve(objective, constraints, GoalType.MAXIMIZE)});
        } catch (NoFeasibleSolutionException e) {
            return Optional.empty();
        }
    }

    /** Solved by {@link OlderSimplex}, an implementation other than the engine's. */
    private static double solve(LinearObjectiveFunction objective, List<LinearConstraint> constraints, GoalType goal) {
        return OlderSimplex.solve(objective, constraints, goal, TOLERANCE, 100_000);
    }

    private List<LinearConstraint> constraints(Set<Assumption> assumptions, Direction better) {
        int n = 4 * vectors();
        List<LinearConstraint> out = new ArrayList<>();
        // The observed law, cell by cell.
        for (int z = 0; z < levels; z++) {
            for (int t = 0; t < 2; t++) {
                for (int y = 0; y < 2; y++) {
                    double[] row = new double[n];
                    for (int y0 = 0; y0 < 2; y0++) {
                        for (int y1 = 0; y1 < 2; y1++) {
                            for (int d = 0; d < vectors(); d++) {
                                boolean shows = taken(d, z) == t && (t == 1 ? y1 : y0) == y;
                                row[index(y0, y1, d)] = shows ? 1 : 0;
                            }
                        }
                    }
                    out.add(new LinearConstraint(row, Relationship.EQ, cells[z][t][y]));
                }
            }
        }
        // g(y) orders outcomes by how good they are.
        double g = better == Direction.HIGHER ? 1 : -1;
        double[] ruledOut = new double[n];
        for (int y0 = 0; y0 < 2; y0++) {
            for (int y1 = 0; y1 < 2; y1++) {
                for (int d = 0; d < vectors(); d++) {
                    boolean out1 = false;
                    for (Assumption as : assumptions) {
                        switch (as) {
                            // Manski 1997: treatment never lowers (raises) any unit's outcome.
                            case MTR_POSITIVE -> out1 |= value(y1) < value(y0);
                            case MTR_NEGATIVE -> out1 |= value(y1) > value(y0);
                            // Roy 1951 / Manski 1990: at whatever level a unit is assigned, the arm it
                            // takes is at least as good for it as the other.
                            case OPTIMIZING_SELECTION -> {
                                for (int z = 0; z < levels; z++) {
                                    double takenMinusOther = taken(d, z) == 1
                                            ? g * (value(y1) - value(y0)) : g * (value(y0) - value(y1));
                                    out1 |= takenMinusOther < 0;
                                }
                            }
                            default -> {
                            }
                        }
                    }
                    ruledOut[index(y0, y1, d)] = out1 ? 1 : 0;
                }
            }
        }
        out.add(new LinearConstraint(ruledOut, Relationship.EQ, 0));
        // Conditions on means, at each level: E[Y_s | T = t, z] for the unobserved s = 1 - t,
        // against the observed E[Y | T = s, z]. Conditional means are multiplied out by the known
        // P(T = t | z); a level where an arm is empty gives no condition involving that arm.
        for (int z = 0; z < levels; z++) {
            double p1 = cells[z][1][0] + cells[z][1][1];
            double p0 = cells[z][0][0] + cells[z][0][1];
            double mu1 = p1 == 0 ? Double.NaN : (a * cells[z][1][0] + b * cells[z][1][1]) / p1;
            double mu0 = p0 == 0 ? Double.NaN : (a * cells[z][0][0] + b * cells[z][0][1]) / p0;
            for (Assumption as : assumptions) {
                switch (as) {
                    // Manski & Pepper 2000: E[Y_s | T=1] >= E[Y_s | T=0] for s = 1, 0 (at each level).
                    case MTS_POSITIVE -> {
                        unobservedMean(out, z, 0, 1, Relationship.LEQ, mu1, p0);
                        unobservedMean(out, z, 1, 0, Relationship.GEQ, mu0, p1);
                    }
                    case MTS_NEGATIVE -> {
                        unobservedMean(out, z, 0, 1, Relationship.GEQ, mu1, p0);
                        unobservedMean(out, z, 1, 0, Relationship.LEQ, mu0, p1);
                    }
                    // Takers do better treated than non-takers would: E[g(Y1) | T=1] >= E[g(Y1) | T=0];
                    // non-takers do better untreated than takers would: E[g(Y0) | T=0] >= E[g(Y0) | T=1].
                    case SORTING_ON_GAINS -> {
                        Relationship r = better == Direction.HIGHER ? Relationship.LEQ : Relationship.GEQ;
                        unobservedMean(out, z, 0, 1, r, mu1, p0);
                        unobservedMean(out, z, 1, 0, r, mu0, p1);
                    }
                    default -> {
                    }
                }
            }
        }
        return out;
    }

    /** {@code E[Y_s | T = t, z] * P(T = t | z)  rel  observed * P(T = t | z)}; nothing when either side's arm is empty. */
    private void unobservedMean(List<LinearConstraint> out, int z, int t, int s, Relationship relationship, double observed,
                                double share) {
        if (Double.isNaN(observed) || share == 0) {
            return;
        }
        double[] row = new double[4 * vectors()];
        for (int y0 = 0; y0 < 2; y0++) {
            for (int y1 = 0; y1 < 2; y1++) {
                for (int d = 0; d < vectors(); d++) {
                    if (taken(d, z) == t) {
                        row[index(y0, y1, d)] = value(s == 1 ? y1 : y0);
                    }
                }
            }
        }
        out.add(new LinearConstraint(row, relationship, observed * share));
    }
}
