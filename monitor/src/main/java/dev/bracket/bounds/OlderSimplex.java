package dev.bracket.bounds;

import org.apache.commons.math3.optim.linear.LinearConstraint;
import org.apache.commons.math3.optim.linear.LinearObjectiveFunction;
import org.apache.commons.math3.optim.linear.NoFeasibleSolutionException;
import org.apache.commons.math3.optim.nonlinear.scalar.GoalType;

import java.util.ArrayList;
import java.util.List;

/**
 * Commons Math's older simplex implementation ({@code org.apache.commons.math3.optimization.linear},
 * deprecated there) behind the newer {@code optim.linear} types. Kept because the newer solver of
 * 3.6.1 stops at a vertex that is not optimal on some programs (minimise {@code -0.5 x1 + 0.5 x2}
 * subject to {@code x0 + x1 + x2 + x3 = 0.2}, x &gt;= 0: it answers 0, the optimum is -0.1), while
 * the older one solves them: {@link ResponseTypeProgram} runs both, and the tests' reference
 * programs use this one so that a fault of the engine's solver cannot hide on both sides.
 */
final class OlderSimplex {

    private OlderSimplex() {
    }

    /** The optimum of {@code objective} over x &gt;= 0 and {@code constraints}; NoFeasibleSolutionException when none. */
    @SuppressWarnings("deprecation")
    static double solve(LinearObjectiveFunction objective, List<LinearConstraint> constraints, GoalType goal, double tolerance,
                        int maxIterations) {
        List<org.apache.commons.math3.optimization.linear.LinearConstraint> old = new ArrayList<>();
        for (LinearConstraint c : constraints) {
            old.add(new org.apache.commons.math3.optimization.linear.LinearConstraint(c.getCoefficients(),
                    org.apache.commons.math3.optimization.linear.Relationship.valueOf(c.getRelationship().name()), c.getValue()));
        }
        org.apache.commons.math3.optimization.linear.SimplexSolver solver =
                new org.apache.commons.math3.optimization.linear.SimplexSolver(tolerance, 10);
        solver.setMaxIterations(maxIterations);
        try {
            return solver.optimize(new org.apache.commons.math3.optimization.linear.LinearObjectiveFunction(
                            objective.getCoefficients(), objective.getConstantTerm()), old,
                    goal == GoalType.MINIMIZE ? org.apache.commons.math3.optimization.GoalType.MINIMIZE
                            : org.apache.commons.math3.optimization.GoalType.MAXIMIZE, true).getValue();
        } catch (org.apache.commons.math3.optimization.linear.NoFeasibleSolutionException e) {
            throw new NoFeasibleSolutionException();
        }
    }
}
