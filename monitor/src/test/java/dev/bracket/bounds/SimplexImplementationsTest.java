package dev.bracket.bounds;

import org.apache.commons.math3.optim.MaxIter;
import org.apache.commons.math3.optim.linear.LinearConstraint;
import org.apache.commons.math3.optim.linear.LinearConstraintSet;
import org.apache.commons.math3.optim.linear.LinearObjectiveFunction;
import org.apache.commons.math3.optim.linear.NonNegativeConstraint;
import org.apache.commons.math3.optim.linear.PivotSelectionRule;
import org.apache.commons.math3.optim.linear.Relationship;
import org.apache.commons.math3.optim.linear.SimplexSolver;
import org.apache.commons.math3.optim.nonlinear.scalar.GoalType;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.util.List;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Why {@link ResponseTypeProgram} solves every program with two simplex implementations and keeps
 * the more extreme optimum. The program: minimise {@code -0.5 x1 + 0.5 x2} subject to
 * {@code x0 + x1 + x2 + x3 = 0.2}, x &gt;= 0; by hand, all mass on x1 gives the optimum -0.1.
 */
class SimplexImplementationsTest {

    private static final LinearObjectiveFunction OBJECTIVE = new LinearObjectiveFunction(new double[] {0, -0.5, 0.5, 0}, 0);
    private static final List<LinearConstraint> MASS = List.of(new LinearConstraint(new double[] {1, 1, 1, 1}, Relationship.EQ, 0.2));

    @Test
    @DisplayName("Commons Math 3.6.1's newer simplex stops short of the optimum here (if this fails, it was fixed: one implementation may do)")
    void newerImplementationStopsShort() {
        for (PivotSelectionRule rule : PivotSelectionRule.values()) {
            double value = new SimplexSolver(ResponseTypeProgram.EPSILON).optimize(new MaxIter(1_000), OBJECTIVE,
                    new LinearConstraintSet(MASS), GoalType.MINIMIZE, new NonNegativeConstraint(true), rule).getValue();
            assertTrue(value > -0.1 + 1e-6, rule + " rule answered " + value);
        }
    }

    @Test
    @DisplayName("the older implementation, which the engine also runs, finds the optimum -0.1")
    void olderImplementationFindsTheOptimum() {
        assertEquals(-0.1, OlderSimplex.solve(OBJECTIVE, MASS, GoalType.MINIMIZE, ResponseTypeProgram.EPSILON, 1_000), 1e-12);
    }
}
