package dev.bracket.bounds;

import org.apache.commons.math3.exception.TooManyIterationsException;
import org.apache.commons.math3.optim.MaxIter;
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
import java.util.function.IntToDoubleFunction;
import java.util.stream.IntStream;

/**
 * The ATE of a binary outcome under an independent instrument, minimised and maximised over the
 * laws q of response types ({@link ResponseTypes}) that agree with the data: the linear programs
 * of Balke &amp; Pearl (1997), JASA 92(439), §3 (there for a binary instrument; the same programs
 * for any number of levels), solved with two of Commons Math's simplex implementations (see
 * {@link #solve}). On the unit scale
 * ({@code min} = 0, {@code max} = 1) the objective is {@code ATE = sum_type q (Y1 - Y0)}.
 *
 * <p>At each level z the data are given as a box of observables ({@link ObservablesBox}): a
 * single point for the estimates, a confidence box for the bands. With the sums running over
 * the types that take treatment at z ({@code takes}) or not ({@code !takes}), the box is linear
 * in q after multiplying the means out:
 *
 * <pre>
 *   pLow &lt;= sum_takes q &lt;= pHigh
 *   sum_takes  q (Y1 - mu1Low) &gt;= 0,   sum_takes  q (Y1 - mu1High) &lt;= 0
 *   sum_!takes q (Y0 - mu0Low) &gt;= 0,   sum_!takes q (Y0 - mu0High) &lt;= 0
 *   sum q = 1,  q &gt;= 0
 * </pre>
 *
 * A law q satisfies these exactly when the treated share and arm means it implies at every level
 * lie in that level's box (the mean of an arm without mass is unconstrained, as for an arm
 * without units). So the two optima are the lowest lower and highest upper sharp bound over all
 * points of the boxes: the sharp bounds for a point, their projection for confidence boxes.
 *
 * <p>The other assumptions, each written on the types (applied at every level, as the
 * mean-independence bounds apply them):
 * <ul>
 *   <li>{@code mtr-positive} (Manski 1997): types with Y1 &lt; Y0 get no mass; {@code mtr-negative}
 *       likewise Y1 &gt; Y0;</li>
 *   <li>{@code optimizing-selection} (Roy 1951; Manski 1990): every unit is in its better arm at
 *       every level, so a type that takes treatment at some level while its untreated outcome is
 *       better, or stays untreated at some level while its treated outcome is better, gets no mass;</li>
 *   <li>{@code mts-positive} (Manski &amp; Pepper 2000): {@code E[Y1 | T=0, z] <= E[Y | T=1, z]} and
 *       {@code E[Y0 | T=1, z] >= E[Y | T=0, z]}, written {@code sum_!takes q (Y1 - mu1High) <= 0} and
 *       {@code sum_takes q (Y0 - mu0Low) >= 0}; {@code mts-negative} and {@code sorting-on-gains}
 *       the same way with their own directions (see {@link Assumption}). For a point box this is
 *       the constraint itself; over a wider box the far end of the observed mean's interval is
 *       used, which keeps every law the box allows (the band stays valid) but can make the band
 *       wider than the exact projection.</li>
 * </ul>
 * An infeasible program means that the data contradict the assumptions; under independence
 * alone with a binary instrument that happens exactly when Pearl's instrumental inequality
 * {@code max_t sum_y max_z P(Y = y, T = t | Z = z) <= 1} fails (Pearl 1995, UAI-95). Feasibility is
 * judged to the solver's tolerance {@value #EPSILON} on the unit scale.
 */
final class ResponseTypeProgram {

    /** Solver tolerance on the unit scale: far above the rounding of probabilities from counts, far below any sampling error. */
    static final double EPSILON = 1e-9;

    /** Pivots allowed per solve: far more than programs of this size need, a guard against cycling only. */
    private static final int MAX_ITERATIONS = 10_000;

    private final ResponseTypes types;
    private final int[] allowed;
    private final List<LinearConstraint> constraints = new ArrayList<>();

    /**
     * @param levels one box of observables per instrument level with units (outcome means on the outcome's scale)
     * @param range  the declared range of the binary outcome
     */
    ResponseTypeProgram(List<ObservablesBox> levels, OutcomeRange range, AssumptionSet assumptions) {
        this.types = new ResponseTypes(levels.size());
        this.allowed = IntStream.range(0, types.count()).filter(t -> admitted(t, assumptions, range.better())).toArray();
        add(t -> 1, Relationship.EQ, 1);
        for (int z = 0; z < levels.size(); z++) {
            observed(z, levels.get(z), range);
            for (Assumption a : assumptions.members()) {
                crossArm(a, z, levels.get(z), range);
            }
        }
    }

    /** [min, max] of the ATE on the unit scale; empty when no law of types satisfies every constraint. */
    Optional<double[]> ateRange() {
        if (allowed.length == 0) {
            return Optional.empty();
        }
        LinearObjectiveFunction ate = new LinearObjectiveFunction(row(t -> types.y1(t) - types.y0(t)), 0);
        try {
            return Optional.of(new double[] {solve(ate, GoalType.MINIMIZE), solve(ate, GoalType.MAXIMIZE)});
        } catch (NoFeasibleSolutionException e) {
            return Optional.empty();
        }
    }

    /**
     * The optimum as the more extreme of two simplex implementations, the newer {@code optim.linear}
     * one and {@link OlderSimplex} (the newer one stops short of the optimum on some programs,
     * which here would make a sharp bound too narrow). Every value either solver returns is the
     * objective at a feasible law, so it can only fall short of the optimum, never pass it: the
     * lower of two minima (the higher of two maxima) is exact as soon as one of them is. The
     * program is infeasible only if both say so.
     */
    private double solve(LinearObjectiveFunction objective, GoalType goal) {
        Double newer = feasibleOrNull(() -> solveNewer(objective, goal));
        Double older = feasibleOrNull(() -> OlderSimplex.solve(objective, constraints, goal, EPSILON, MAX_ITERATIONS));
        if (newer == null && older == null) {
            throw new NoFeasibleSolutionException();
        }
        if (newer == null || older == null) {
            return newer == null ? older : newer;
        }
        return goal == GoalType.MINIMIZE ? Math.min(newer, older) : Math.max(newer, older);
    }

    private static Double feasibleOrNull(java.util.function.DoubleSupplier solver) {
        try {
            return solver.getAsDouble();
        } catch (NoFeasibleSolutionException e) {
            return null;
        }
    }

    /**
     * Dantzig's rule first; Commons Math breaks its ties by Bland's rule. On these highly
     * degenerate programs (many empty cells, pairs of constraints that pin a mean) Bland's rule
     * alone was seen to cycle, while Dantzig's was not; should Dantzig's ever run out of
     * iterations, Bland's is tried before giving up.
     */
    private double solveNewer(LinearObjectiveFunction objective, GoalType goal) {
        try {
            return solveNewer(objective, goal, PivotSelectionRule.DANTZIG);
        } catch (TooManyIterationsException e) {
            return solveNewer(objective, goal, PivotSelectionRule.BLAND);
        }
    }

    private double solveNewer(LinearObjectiveFunction objective, GoalType goal, PivotSelectionRule rule) {
        return new SimplexSolver(EPSILON).optimize(new MaxIter(MAX_ITERATIONS), objective, new LinearConstraintSet(constraints), goal,
                new NonNegativeConstraint(true), rule).getValue();
    }

    /** Pointwise assumptions: whether a type may have mass at all. */
    private boolean admitted(int type, AssumptionSet assumptions, Direction better) {
        int y1 = types.y1(type);
        int y0 = types.y0(type);
        if (assumptions.contains(Assumption.MTR_POSITIVE) && y1 < y0) {
            return false;
        }
        if (assumptions.contains(Assumption.MTR_NEGATIVE) && y1 > y0) {
            return false;
        }
        if (assumptions.contains(Assumption.OPTIMIZING_SELECTION)) {
            int gain = better == Direction.HIGHER ? y1 - y0 : y0 - y1;
            for (int z = 0; z < types.levels(); z++) {
                if (types.takes(type, z) ? gain < 0 : gain > 0) {
                    return false;
                }
            }
        }
        return true;
    }

    /** The level's box of treated share and arm means. */
    private void observed(int z, ObservablesBox box, OutcomeRange range) {
        within(t -> types.takes(t, z) ? 1 : 0, box.pLow(), box.pHigh());
        observedMean(1, z, range.toUnit(box.mu1Low()), range.toUnit(box.mu1High()));
        observedMean(0, z, range.toUnit(box.mu0Low()), range.toUnit(box.mu0High()));
    }

    /** The observed mean of arm t at level z, {@code E[Y_t | T = t, z]}, in [low, high]. */
    private void observedMean(int t, int z, double low, double high) {
        if (low == high) {
            mean(t, t, z, Relationship.EQ, low);
        } else {
            mean(t, t, z, Relationship.GEQ, low);
            mean(t, t, z, Relationship.LEQ, high);
        }
    }

    /**
     * Manski &amp; Pepper's and the sorting constraints at level z: the unobserved
     * {@code m10 = E[Y1 | T=0, z]} and {@code m01 = E[Y0 | T=1, z]} against the observed means.
     */
    private void crossArm(Assumption a, int z, ObservablesBox box, OutcomeRange range) {
        double mu1Low = range.toUnit(box.mu1Low());
        double mu1High = range.toUnit(box.mu1High());
        double mu0Low = range.toUnit(box.mu0Low());
        double mu0High = range.toUnit(box.mu0High());
        boolean higher = range.better() == Direction.HIGHER;
        switch (a) {
            case MTS_POSITIVE -> {
                mean(0, 1, z, Relationship.LEQ, mu1High);
                mean(1, 0, z, Relationship.GEQ, mu0Low);
            }
            case MTS_NEGATIVE -> {
                mean(0, 1, z, Relationship.GEQ, mu1Low);
                mean(1, 0, z, Relationship.LEQ, mu0High);
            }
            case SORTING_ON_GAINS -> {
                mean(0, 1, z, higher ? Relationship.LEQ : Relationship.GEQ, higher ? mu1High : mu1Low);
                mean(1, 0, z, higher ? Relationship.LEQ : Relationship.GEQ, higher ? mu0High : mu0Low);
            }
            default -> {
                // worst-case adds nothing; mtr-* and optimizing-selection act on the types themselves
            }
        }
    }

    /**
     * {@code E[Y_s | T = t, z]} compared with c, multiplied out by {@code P(T = t | z)}:
     * {@code sum over types with takes(z) == (t == 1) of q (Y_s - c)} compared with 0. Left out where
     * it cannot bind (a mean at least 0 or at most 1).
     */
    private void mean(int t, int s, int z, Relationship relationship, double c) {
        if (relationship == Relationship.GEQ && c <= 0 || relationship == Relationship.LEQ && c >= 1) {
            return;
        }
        add(type -> types.takes(type, z) == (t == 1) ? (s == 1 ? types.y1(type) : types.y0(type)) - c : 0, relationship, 0);
    }

    /** {@code low <= form <= high} for a form that lies in [0, 1] anyway; one equation when the ends meet. */
    private void within(IntToDoubleFunction form, double low, double high) {
        if (low == high) {
            add(form, Relationship.EQ, low);
            return;
        }
        if (low > 0) {
            add(form, Relationship.GEQ, low);
        }
        if (high < 1) {
            add(form, Relationship.LEQ, high);
        }
    }

    private void add(IntToDoubleFunction coefficient, Relationship relationship, double value) {
        constraints.add(new LinearConstraint(row(coefficient), relationship, value));
    }

    private double[] row(IntToDoubleFunction coefficient) {
        double[] row = new double[allowed.length];
        for (int i = 0; i < allowed.length; i++) {
            row[i] = coefficient.applyAsDouble(allowed[i]);
        }
        return row;
    }
}
