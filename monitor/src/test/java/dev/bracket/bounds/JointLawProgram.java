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
 * The identified set of the ATE computed the long way, as a linear program over joint laws
 * {@code q(y1, y0, t, r)} of the two potential outcomes, treatment and response (whether the
 * unit's outcome has arrived) on a finite outcome grid, solved by Commons Math 3.6.1's older
 * simplex solver ({@link OlderSimplex}). Independent of the engine: the assumptions are written here from their
 * meaning, not from the engine's table of constraints.
 *
 * <p>Variables {@code q(t, r, i, j) >= 0} = P(Y1 = y_i, Y0 = y_j, T = t, R = r). The observed
 * law fixes {@code sum_j q(1, 1, i, j) = P(Y = y_i, T = 1, R = 1)} (treated units with an outcome
 * show Y1), {@code sum_i q(0, 1, i, j) = P(Y = y_j, T = 0, R = 1)}, and for the pending units only
 * their mass per arm, {@code sum_ij q(t, 0, i, j) = P(T = t, R = 0)} (Horowitz &amp; Manski 2000,
 * JASA 95(449): nothing is known of a missing outcome but its range). The objective is
 * {@code E[Y1 - Y0] = sum q(t, r, i, j) (y_i - y_j)}. Pointwise assumptions force cells to zero;
 * assumptions on conditional means are linear after multiplying out the known P(T = t) and
 * P(T = t, R = r). Every assumption is about all units of an arm, pending or not.
 */
final class JointLawProgram {

    /** Solver tolerance for feasibility and optimality. */
    static final double TOLERANCE = 1e-7;

    private final double[] grid;
    private final double[] treated;
    private final double[] control;
    private final double treatedPending;
    private final double controlPending;
    private final int k;

    /**
     * @param grid           outcome values y_0 &lt; ... &lt; y_{K-1}
     * @param treated        P(Y = y_i, T = 1, R = 1) for each grid value
     * @param control        P(Y = y_j, T = 0, R = 1) for each grid value
     * @param treatedPending P(T = 1, R = 0): treated units whose outcome has not arrived
     * @param controlPending P(T = 0, R = 0)
     */
    JointLawProgram(double[] grid, double[] treated, double[] control, double treatedPending, double controlPending) {
        this.grid = grid.clone();
        this.treated = treated.clone();
        this.control = control.clone();
        this.treatedPending = treatedPending;
        this.controlPending = controlPending;
        this.k = grid.length;
    }

    private int index(int t, int r, int i, int j) {
        return ((t * 2 + r) * k + i) * k + j;
    }

    private int variables() {
        return 4 * k * k;
    }

    /** [min, max] of E[Y1 - Y0] over the joint laws the assumptions allow; empty when none exists. */
    Optional<double[]> ateRange(Set<Assumption> assumptions, Direction better) {
        List<LinearConstraint> constraints = constraints(assumptions, better);
        double[] gain = new double[variables()];
        for (int t = 0; t < 2; t++) {
            for (int r = 0; r < 2; r++) {
                for (int i = 0; i < k; i++) {
                    for (int j = 0; j < k; j++) {
                        gain[index(t, r, i, j)] = grid[i] - grid[j];
                    }
                }
            }
        }
        LinearObjectiveFunction objective = new LinearObjectiveFunction(gain, 0);
        try {
            double min = solve(objective, constraints, GoalType.MINIMIZE);
            double max = solve(objective, constraints, GoalType.MAXIMIZE);
            return Optional.of(new double[] {min, max});
        } catch (NoFeasibleSolutionException e) {
            return Optional.empty();
        }
    }

    /** Solved by {@link OlderSimplex}, an implementation other than the engine's. */
    private static double solve(LinearObjectiveFunction objective, List<LinearConstraint> constraints, GoalType goal) {
        return OlderSimplex.solve(objective, constraints, goal, TOLERANCE, 100_000);
    }

    /** The linear form {@code E[f(Y_s) 1{T = t}]} (over both response values), f(y) = sign * y. */
    private double[] outcomeMass(int s, int t, double sign) {
        double[] row = new double[variables()];
        for (int r = 0; r < 2; r++) {
            for (int i = 0; i < k; i++) {
                for (int j = 0; j < k; j++) {
                    row[index(t, r, i, j)] = sign * (s == 1 ? grid[i] : grid[j]);
                }
            }
        }
        return row;
    }

    /** {@code sum row * q = value}. */
    private static LinearConstraint mass(double[] row, double value) {
        return new LinearConstraint(row, Relationship.EQ, value);
    }

    /** {@code a * x - b * y} for two linear forms. */
    private static double[] combine(double a, double[] x, double b, double[] y) {
        double[] out = new double[x.length];
        for (int v = 0; v < x.length; v++) {
            out[v] = a * x[v] - b * y[v];
        }
        return out;
    }

    private List<LinearConstraint> constraints(Set<Assumption> assumptions, Direction better) {
        List<LinearConstraint> out = new ArrayList<>();
        double observedTreated = 0;
        double observedControl = 0;
        double treatedOutcomeMass = 0; // E[Y 1{T=1, R=1}]
        double controlOutcomeMass = 0; // E[Y 1{T=0, R=1}]
        for (int i = 0; i < k; i++) {
            observedTreated += treated[i];
            observedControl += control[i];
            treatedOutcomeMass += treated[i] * grid[i];
            controlOutcomeMass += control[i] * grid[i];
        }
        double p = observedTreated + treatedPending;
        double q = observedControl + controlPending;

        // The observed law: outcomes of responding units, and the mass of pending units per arm.
        for (int i = 0; i < k; i++) {
            double[] row = new double[variables()];
            for (int j = 0; j < k; j++) {
                row[index(1, 1, i, j)] = 1;
            }
            out.add(mass(row, treated[i]));
        }
        for (int j = 0; j < k; j++) {
            double[] row = new double[variables()];
            for (int i = 0; i < k; i++) {
                row[index(0, 1, i, j)] = 1;
            }
            out.add(mass(row, control[j]));
        }
        for (int t = 0; t < 2; t++) {
            double[] row = new double[variables()];
            for (int i = 0; i < k; i++) {
                for (int j = 0; j < k; j++) {
                    row[index(t, 0, i, j)] = 1;
                }
            }
            out.add(mass(row, t == 1 ? treatedPending : controlPending));
        }

        // Sign of "better": g(y) = y when higher is better, -y when lower is better.
        double g = better == Direction.HIGHER ? 1 : -1;
        boolean[] forbidden = new boolean[variables()];
        for (Assumption a : assumptions) {
            for (int t = 0; t < 2; t++) {
                for (int r = 0; r < 2; r++) {
                    for (int i = 0; i < k; i++) {
                        for (int j = 0; j < k; j++) {
                            double y1 = grid[i];
                            double y0 = grid[j];
                            boolean ruledOut = switch (a) {
                                // Every unit: Y1 >= Y0 (Manski 1997).
                                case MTR_POSITIVE -> y1 < y0;
                                // Every unit: Y1 <= Y0.
                                case MTR_NEGATIVE -> y1 > y0;
                                // Every unit is in its better arm (Roy 1951; Manski 1990):
                                // treated have g(Y1) >= g(Y0), untreated have g(Y0) >= g(Y1).
                                case OPTIMIZING_SELECTION -> t == 1 ? g * y1 < g * y0 : g * y0 < g * y1;
                                default -> false;
                            };
                            forbidden[index(t, r, i, j)] |= ruledOut;
                        }
                    }
                }
            }
        }
        // q >= 0, so a zero sum over the ruled-out cells sets each of them to zero.
        double[] ruledOutRow = new double[variables()];
        for (int v = 0; v < variables(); v++) {
            ruledOutRow[v] = forbidden[v] ? 1 : 0;
        }
        out.add(mass(ruledOutRow, 0));

        // E[h | T=1] >= E[h | T=0] written as P(T=0) E[h 1{T=1}] - P(T=1) E[h 1{T=0}] >= 0.
        for (Assumption a : assumptions) {
            switch (a) {
                // Manski & Pepper 2000: E[Y_s | T=1] >= E[Y_s | T=0] for s = 1, 0.
                case MTS_POSITIVE -> {
                    out.add(new LinearConstraint(combine(q, outcomeMass(1, 1, 1), p, outcomeMass(1, 0, 1)), Relationship.GEQ, 0));
                    out.add(new LinearConstraint(combine(q, outcomeMass(0, 1, 1), p, outcomeMass(0, 0, 1)), Relationship.GEQ, 0));
                }
                case MTS_NEGATIVE -> {
                    out.add(new LinearConstraint(combine(q, outcomeMass(1, 1, 1), p, outcomeMass(1, 0, 1)), Relationship.LEQ, 0));
                    out.add(new LinearConstraint(combine(q, outcomeMass(0, 1, 1), p, outcomeMass(0, 0, 1)), Relationship.LEQ, 0));
                }
                // Takers do better treated than non-takers would: E[g(Y1) | T=1] >= E[g(Y1) | T=0];
                // non-takers do better untreated than takers would: E[g(Y0) | T=0] >= E[g(Y0) | T=1].
                case SORTING_ON_GAINS -> {
                    out.add(new LinearConstraint(combine(q, outcomeMass(1, 1, g), p, outcomeMass(1, 0, g)), Relationship.GEQ, 0));
                    out.add(new LinearConstraint(combine(p, outcomeMass(0, 0, g), q, outcomeMass(0, 1, g)), Relationship.GEQ, 0));
                }
                // Rubin 1976: in each arm the pending units' mean outcome equals the responding units',
                // E[Y 1{T=t,R=0}] P(T=t,R=1) = E[Y 1{T=t,R=1}] P(T=t,R=0); vacuous when nobody responded.
                case MISSING_AT_RANDOM -> {
                    double[] treatedPendingMass = new double[variables()];
                    double[] controlPendingMass = new double[variables()];
                    for (int i = 0; i < k; i++) {
                        for (int j = 0; j < k; j++) {
                            treatedPendingMass[index(1, 0, i, j)] = grid[i] * observedTreated;
                            controlPendingMass[index(0, 0, i, j)] = grid[j] * observedControl;
                        }
                    }
                    out.add(new LinearConstraint(treatedPendingMass, Relationship.EQ, treatedOutcomeMass * treatedPending));
                    out.add(new LinearConstraint(controlPendingMass, Relationship.EQ, controlOutcomeMass * controlPending));
                }
                default -> {
                }
            }
        }
        return out;
    }
}
