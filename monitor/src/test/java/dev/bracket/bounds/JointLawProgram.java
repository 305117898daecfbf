package dev.bracket.bounds;

import org.apache.commons.math3.optim.MaxIter;
import org.apache.commons.math3.optim.PointValuePair;
import org.apache.commons.math3.optim.linear.LinearConstraint;
import org.apache.commons.math3.optim.linear.LinearConstraintSet;
import org.apache.commons.math3.optim.linear.LinearObjectiveFunction;
import org.apache.commons.math3.optim.linear.NoFeasibleSolutionException;
import org.apache.commons.math3.optim.linear.NonNegativeConstraint;
import org.apache.commons.math3.optim.linear.PivotSelectionRule;
import org.apache.commons.math3.optim.linear.Relationship;
import org.apache.commons.math3.optim.linear.SimplexSolver;
import org.apache.commons.math3.optim.nonlinear.scalar.GoalType;

import java.util.ArrayList;
import java.util.List;
import java.util.Optional;
import java.util.Set;

/**
 * The identified set of the ATE computed the long way, as a linear program over joint laws
 * {@code q(y1, y0, t)} of the two potential outcomes and treatment on a finite outcome grid,
 * solved by Commons Math 3.6.1's {@link SimplexSolver}. Independent of the engine: the
 * assumptions are written here from their meaning, not from the engine's table of constraints.
 *
 * <p>Variables {@code q(t, i, j) >= 0} = P(Y1 = y_i, Y0 = y_j, T = t). The observed law fixes
 * {@code sum_j q(1, i, j) = P(Y = y_i, T = 1)} (treated units show Y1) and
 * {@code sum_i q(0, i, j) = P(Y = y_j, T = 0)} (untreated units show Y0). The objective is
 * {@code E[Y1 - Y0] = sum q(t, i, j) (y_i - y_j)}. Pointwise assumptions force cells to zero;
 * assumptions on conditional means are linear after multiplying out the known P(T = t).
 */
final class JointLawProgram {

    /** Solver tolerance for feasibility and optimality. */
    static final double TOLERANCE = 1e-7;

    private final double[] grid;
    private final double[] treated;
    private final double[] control;
    private final int k;

    /**
     * @param grid    outcome values y_0 &lt; ... &lt; y_{K-1}
     * @param treated P(Y = y_i, T = 1) for each grid value
     * @param control P(Y = y_j, T = 0) for each grid value
     */
    JointLawProgram(double[] grid, double[] treated, double[] control) {
        this.grid = grid.clone();
        this.treated = treated.clone();
        this.control = control.clone();
        this.k = grid.length;
    }

    private int index(int t, int i, int j) {
        return (t * k + i) * k + j;
    }

    private int variables() {
        return 2 * k * k;
    }

    /** [min, max] of E[Y1 - Y0] over the joint laws the assumptions allow; empty when none exists. */
    Optional<double[]> ateRange(Set<Assumption> assumptions, Direction better) {
        List<LinearConstraint> constraints = constraints(assumptions, better);
        double[] gain = new double[variables()];
        for (int t = 0; t < 2; t++) {
            for (int i = 0; i < k; i++) {
                for (int j = 0; j < k; j++) {
                    gain[index(t, i, j)] = grid[i] - grid[j];
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

    private static double solve(LinearObjectiveFunction objective, List<LinearConstraint> constraints, GoalType goal) {
        PointValuePair solution = new SimplexSolver(TOLERANCE).optimize(new MaxIter(100_000), objective,
                new LinearConstraintSet(constraints), goal, new NonNegativeConstraint(true), PivotSelectionRule.BLAND);
        return solution.getValue();
    }

    private List<LinearConstraint> constraints(Set<Assumption> assumptions, Direction better) {
        List<LinearConstraint> out = new ArrayList<>();
        double p = 0;
        double mu1Mass = 0; // E[Y 1{T=1}]
        double mu0Mass = 0; // E[Y 1{T=0}]
        for (int i = 0; i < k; i++) {
            p += treated[i];
            mu1Mass += treated[i] * grid[i];
            mu0Mass += control[i] * grid[i];
        }
        double q = 1 - p;
        double mu1 = mu1Mass / p;
        double mu0 = mu0Mass / q;

        // The observed law.
        for (int i = 0; i < k; i++) {
            double[] row = new double[variables()];
            for (int j = 0; j < k; j++) {
                row[index(1, i, j)] = 1;
            }
            out.add(new LinearConstraint(row, Relationship.EQ, treated[i]));
        }
        for (int j = 0; j < k; j++) {
            double[] row = new double[variables()];
            for (int i = 0; i < k; i++) {
                row[index(0, i, j)] = 1;
            }
            out.add(new LinearConstraint(row, Relationship.EQ, control[j]));
        }

        // Sign of "better": g(y) = y when higher is better, -y when lower is better.
        double g = better == Direction.HIGHER ? 1 : -1;
        boolean[] forbidden = new boolean[variables()];
        for (Assumption a : assumptions) {
            for (int t = 0; t < 2; t++) {
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
                        forbidden[index(t, i, j)] |= ruledOut;
                    }
                }
            }
        }
        // q >= 0, so a zero sum over the ruled-out cells sets each of them to zero.
        double[] ruledOutRow = new double[variables()];
        for (int v = 0; v < variables(); v++) {
            ruledOutRow[v] = forbidden[v] ? 1 : 0;
        }
        out.add(new LinearConstraint(ruledOutRow, Relationship.EQ, 0));

        // m10 * (1-p) = E[Y1 1{T=0}] and m01 * p = E[Y0 1{T=1}] as linear forms in q.
        double[] m10Mass = new double[variables()];
        double[] m01Mass = new double[variables()];
        for (int i = 0; i < k; i++) {
            for (int j = 0; j < k; j++) {
                m10Mass[index(0, i, j)] = grid[i];
                m01Mass[index(1, i, j)] = grid[j];
            }
        }
        for (Assumption a : assumptions) {
            switch (a) {
                // Manski & Pepper 2000: E[Y_s | T=1] >= E[Y_s | T=0] for s = 1, 0.
                case MTS_POSITIVE -> {
                    out.add(new LinearConstraint(m10Mass, Relationship.LEQ, mu1 * q));
                    out.add(new LinearConstraint(m01Mass, Relationship.GEQ, mu0 * p));
                }
                case MTS_NEGATIVE -> {
                    out.add(new LinearConstraint(m10Mass, Relationship.GEQ, mu1 * q));
                    out.add(new LinearConstraint(m01Mass, Relationship.LEQ, mu0 * p));
                }
                // Takers do better treated than non-takers would: E[g(Y1) | T=1] >= E[g(Y1) | T=0];
                // non-takers do better untreated than takers would: E[g(Y0) | T=0] >= E[g(Y0) | T=1].
                case SORTING_ON_GAINS -> {
                    out.add(new LinearConstraint(m10Mass, better == Direction.HIGHER ? Relationship.LEQ : Relationship.GEQ, mu1 * q));
                    out.add(new LinearConstraint(m01Mass, better == Direction.HIGHER ? Relationship.LEQ : Relationship.GEQ, mu0 * p));
                }
                default -> {
                }
            }
        }
        return out;
    }
}
