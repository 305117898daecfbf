package dev.bracket.bounds;

import org.apache.commons.math3.optim.linear.LinearConstraint;
import org.apache.commons.math3.optim.linear.LinearObjectiveFunction;
import org.apache.commons.math3.optim.linear.NoFeasibleSolutionException;
import org.apache.commons.math3.optim.nonlinear.scalar.GoalType;

import java.util.ArrayList;
import java.util.List;

/**
 * The reference linear programs of the tests are solved by Commons Math's older
 * {@code org.apache.commons.math3.optimization.linear.SimplexSolver}, not by the newer
 * {@code optim.linear} one the engine uses, so that a fault of one implementation cannot hide in
 * both sides of a comparison: the newer solver of 3.6.1 stopped at a non-optimal vertex on a law
 * with pending units (smallest case seen: minimise {@code -0.5 x1 + 0.5 x2} subject to
 * {@code x0 + x1 + x2 + x3 = 0.2}, x &gt;= 0, answered 0 instead of -0.1; found by these tests,
 * not looked up in the library's tracker).
 */
final class OlderSimplex {

    private OlderSimplex() {
    }

    /** The optimum of {@code objective} over x &gt;= 0 and {@code constraints}; NoFeasibleSolutionException when none. */
    @SuppressWarnings("deprecation")
    static double solve(LinearObjectiveFunction objective, List<LinearConstraint> constraints, GoalType goal, double tolerance) {
        List<org.apache.commons.math3.optimization.linear.LinearConstraint> old = new ArrayList<>();
        for (LinearConstraint c : constraints) {
            old.add(new org.apache.commons.math3.optimization.linear.LinearConstraint(c.getCoefficients(),
                    org.apache.commons.math3.optimization.linear.Relationship.valueOf(c.getRelationship().name()), c.getValue()));
        }
        org.apache.commons.math3.optimization.linear.SimplexSolver solver =
                new org.apache.commons.math3.optimization.linear.SimplexSolver(tolerance, 10);
        solver.setMaxIterations(100_000);
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
