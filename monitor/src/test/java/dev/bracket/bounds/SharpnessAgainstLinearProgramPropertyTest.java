package dev.bracket.bounds;

import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.EnumSet;
import java.util.List;
import java.util.Optional;
import java.util.Set;
import java.util.SplittableRandom;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assertions.fail;

/**
 * The engine's box algebra ({@link BoundCalculator}) against a linear program over joint laws of
 * (Y1, Y0, T, R) ({@link JointLawProgram}, Commons Math {@code SimplexSolver}), R saying whether a
 * unit's outcome has arrived: for random discrete
 * outcome laws on a grid {a, a+h, ..., b}, the engine's interval must equal the LP's [min, max]
 * of E[Y1 - Y0] (sharpness and validity at once), and the engine must say "refuted" exactly when
 * the LP is infeasible. Checked for every single assumption, for every pair of assumptions
 * (which includes the documented combinations {@code mtr-positive,mts-positive} and
 * {@code optimizing-selection,sorting-on-gains}) and one random set of three or more per try, in
 * both outcome directions. Three laws in four have pending units (0 to 4 per arm, sometimes every
 * unit of an arm), so the union over the box of arm means and {@code missing-at-random} are
 * checked against the response indicator's joint law as well.
 *
 * <p>Outcome laws come from small integer counts, so the arms' means are often exactly equal; the
 * engine computes its means by Welford's update from unit-level observations while the LP uses the
 * exact cell probabilities.
 */
class SharpnessAgainstLinearProgramPropertyTest {

    /** Seed of the generated laws; with the case number in a failure's name it replays the case. */
    private static final long SEED = 19970601L;
    private static final List<Case> CASES = SeededCases.generate(SEED, 200, Case::random);

    /** A plausible slip: the treated and control arms exchanged. */
    private static final Engines.FromArms SWAPPED_ARMS = (arms, range, assumptions) ->
            BoundCalculator.interval(new ObservedArms(arms.control(), arms.treated()), range, assumptions);

    /** A plausible slip: pending units dropped, as if the observed outcomes were all there is. */
    private static final Engines.FromArms COMPLETE_CASE = (arms, range, assumptions) ->
            BoundCalculator.interval(new ObservedArms(
                    new ArmStatistics(arms.treated().count(), arms.treated().mean(), arms.treated().m2(), arms.treated().min(), arms.treated().max()),
                    new ArmStatistics(arms.control().count(), arms.control().mean(), arms.control().m2(), arms.control().min(), arms.control().max())),
                    range, assumptions);

    /** Every single assumption and every pair of distinct assumptions. */
    private static final List<Set<Assumption>> SETS = singlesAndPairs();

    /** Every single assumption and every pair of distinct assumptions (shared with the instrument checks). */
    static List<Set<Assumption>> singlesAndPairs() {
        List<Set<Assumption>> sets = new ArrayList<>();
        Assumption[] all = Assumption.values();
        for (int i = 0; i < all.length; i++) {
            sets.add(EnumSet.of(all[i]));
            for (int j = i + 1; j < all.length; j++) {
                sets.add(EnumSet.of(all[i], all[j]));
            }
        }
        return sets;
    }

    /** Counts of units per grid value and arm, and pending units per arm: the law is counts / total. */
    record GridData(double a, double h, int[] treatedCounts, int[] controlCounts, int treatedPending, int controlPending) {

        double[] grid() {
            double[] y = new double[treatedCounts.length];
            for (int i = 0; i < y.length; i++) {
                y[i] = a + i * h;
            }
            return y;
        }

        OutcomeRange range(Direction better) {
            double[] y = grid();
            return new OutcomeRange(y[0], y[y.length - 1], better);
        }

        /** The arms as a stream would build them: one Welford update per outcome, one exposure per unit. */
        ObservedArms arms() {
            double[] y = grid();
            ObservedArms arms = ObservedArms.empty();
            for (int i = 0; i < y.length; i++) {
                for (int u = 0; u < treatedCounts[i]; u++) {
                    arms = arms.add(true, y[i]);
                }
                for (int u = 0; u < controlCounts[i]; u++) {
                    arms = arms.add(false, y[i]);
                }
            }
            if (treatedPending + controlPending == 0) {
                return arms; // no exposure events at all, as a stream without them
            }
            for (int u = 0; u < Arrays.stream(treatedCounts).sum() + treatedPending; u++) {
                arms = arms.addExposure(true);
            }
            for (int u = 0; u < Arrays.stream(controlCounts).sum() + controlPending; u++) {
                arms = arms.addExposure(false);
            }
            return arms;
        }

        JointLawProgram program() {
            double total = Arrays.stream(treatedCounts).sum() + Arrays.stream(controlCounts).sum() + treatedPending + controlPending;
            return new JointLawProgram(grid(),
                    Arrays.stream(treatedCounts).mapToDouble(c -> c / total).toArray(),
                    Arrays.stream(controlCounts).mapToDouble(c -> c / total).toArray(),
                    treatedPending / total, controlPending / total);
        }

        /**
         * Start in -3..3, step 0.25, 0.5, 1 or 2, 0 to 6 units per grid value and arm; one time in four
         * no pending units, otherwise 0 to 4 per arm; at least one unit (observed or pending) per arm.
         */
        static GridData random(SplittableRandom r) {
            int k = 2 + r.nextInt(4);
            double start = r.nextInt(-3, 4);
            double step = SeededCases.oneOf(r, 0.25, 0.5, 1.0, 2.0);
            boolean pending = r.nextInt(4) > 0;
            int[] treated;
            int[] control;
            int treatedPending;
            int controlPending;
            do {
                treated = r.ints(k, 0, 7).toArray();
                control = r.ints(k, 0, 7).toArray();
                treatedPending = pending ? r.nextInt(5) : 0;
                controlPending = pending ? r.nextInt(5) : 0;
            } while (Arrays.stream(treated).sum() + treatedPending == 0 || Arrays.stream(control).sum() + controlPending == 0);
            return new GridData(start, step, treated, control, treatedPending, controlPending);
        }

        @Override
        public String toString() {
            return describe();
        }

        String describe() {
            return "grid " + Arrays.toString(grid()) + ", treated counts " + Arrays.toString(treatedCounts)
                    + " + " + treatedPending + " pending, control counts " + Arrays.toString(controlCounts)
                    + " + " + controlPending + " pending";
        }

        /** Sign of mu1 - mu0 of the observed outcomes in exact integer arithmetic (grid index means); 0 for an arm with none. */
        int meanOrder() {
            long n1 = Arrays.stream(treatedCounts).sum();
            long n0 = Arrays.stream(controlCounts).sum();
            long s1 = 0;
            long s0 = 0;
            for (int i = 0; i < treatedCounts.length; i++) {
                s1 += (long) i * treatedCounts[i];
                s0 += (long) i * controlCounts[i];
            }
            return Long.signum(s1 * n0 - s0 * n1);
        }
    }

    /** An outcome law on a grid of 2 to 5 points and, beyond the pairs, one set of three or more assumptions. */
    record Case(GridData data, Set<Assumption> larger) {

        static Case random(SplittableRandom r) {
            return new Case(GridData.random(r), largerSet(r));
        }

        /** Three or more assumptions held together (shared with the instrument checks). */
        static Set<Assumption> largerSet(SplittableRandom r) {
            Assumption[] all = Assumption.values();
            Set<Assumption> set = EnumSet.noneOf(Assumption.class);
            int size = 3 + r.nextInt(all.length - 2);
            while (set.size() < size) {
                set.add(all[r.nextInt(all.length)]);
            }
            return set;
        }

        @Override
        public String toString() {
            return data.describe() + ", larger set " + AssumptionSet.of(larger);
        }
    }

    static List<Case> cases() {
        return CASES;
    }

    @ParameterizedTest(name = "seed " + SEED + ", case {index}: {0}")
    @MethodSource("cases")
    @DisplayName("the engine's interval equals the linear program's range over joint laws")
    void engineIntervalEqualsLinearProgramOverJointLaws(Case c) {
        equalsLinearProgram(c, Engines.FromArms.REAL);
    }

    @Test
    @DisplayName("the generated laws reach refutation and equal means often enough")
    void generatedLawsCoverRefutationAndTies() {
        // The refutation branch must really be exercised (Manski & Pepper 2000: MTR+ with MTS+ is
        // refuted iff mu1 < mu0; the check above confirms the engine and the LP agree on it).
        long below = CASES.stream().filter(c -> c.data().meanOrder() < 0).count();
        long equal = CASES.stream().filter(c -> c.data().meanOrder() == 0).count();
        System.out.printf("mu1 < mu0 in %d, mu1 = mu0 in %d of %d laws%n", below, equal, CASES.size());
        assertTrue(below >= 0.15 * CASES.size(), "mu1 < mu0 in only " + below + " of " + CASES.size());
        assertTrue(equal >= 1, "no law with equal means");
    }

    @Test
    @DisplayName("the generated laws have pending units often, including arms with no outcome at all")
    void generatedLawsCoverPendingOutcomes() {
        long withPending = CASES.stream().filter(c -> c.data().treatedPending() + c.data().controlPending() > 0).count();
        long allPending = CASES.stream().filter(c -> Arrays.stream(c.data().treatedCounts()).sum() == 0
                || Arrays.stream(c.data().controlCounts()).sum() == 0).count();
        System.out.printf("pending units in %d, an arm with no outcome in %d of %d laws%n", withPending, allPending, CASES.size());
        assertTrue(withPending >= 0.5 * CASES.size(), "pending units in only " + withPending + " of " + CASES.size());
        assertTrue(allPending >= 1, "no law with an arm whose outcomes are all pending");
    }

    @Test
    @DisplayName("the check fails for an engine that ignores pending units (complete-case bounds)")
    void failsForAnEngineThatIgnoresPendingUnits() {
        SeededCases.assertRejectsSome(CASES, c -> equalsLinearProgram(c, COMPLETE_CASE), "complete case");
    }

    @Test
    @DisplayName("the check fails for an engine that swaps the arms")
    void failsForAnEngineThatSwapsTheArms() {
        SeededCases.assertRejectsSome(CASES, c -> equalsLinearProgram(c, SWAPPED_ARMS), "swapped arms");
    }

    static void equalsLinearProgram(Case c, Engines.FromArms engine) {
        GridData data = c.data();
        ObservedArms arms = data.arms();
        JointLawProgram program = data.program();
        for (Direction better : Direction.values()) {
            OutcomeRange range = data.range(better);
            double tolerance = 10 * JointLawProgram.TOLERANCE * (1 + range.width());
            List<Set<Assumption>> sets = new ArrayList<>(SETS);
            sets.add(c.larger());
            for (Set<Assumption> set : sets) {
                IdentifiedInterval interval = engine.interval(arms, range, AssumptionSet.of(set));
                Optional<double[]> lp = program.ateRange(set, better);
                String where = AssumptionSet.of(set) + ", " + better.id() + " better, " + data.describe();
                if (lp.isEmpty()) {
                    assertEquals(BoundStatus.REFUTED, interval.status(), "LP infeasible but engine not refuted: " + where);
                } else {
                    assertTrue(interval.isBounded(), "LP feasible but engine says " + interval.status().id() + ": " + where);
                    assertEquals(lp.get()[0], interval.lower(), tolerance, "lower end: " + where);
                    assertEquals(lp.get()[1], interval.upper(), tolerance, "upper end: " + where);
                }
            }
        }
    }

    @Test
    @DisplayName("the linear program itself detects infeasibility")
    void theLinearProgramItselfDetectsInfeasibility() {
        // Guard against a vacuous check: a law with mu1 < mu0 is infeasible under MTR+ with MTS+.
        GridData data = new GridData(0, 1, new int[] {3, 1}, new int[] {1, 3}, 0, 0);
        assertTrue(data.program().ateRange(EnumSet.of(Assumption.MTR_POSITIVE, Assumption.MTS_POSITIVE), Direction.HIGHER).isEmpty());
        Optional<double[]> worst = data.program().ateRange(EnumSet.of(Assumption.WORST_CASE), Direction.HIGHER);
        if (worst.isEmpty()) {
            fail("worst case must be feasible");
        }
        // Manski 1990: worst-case width equals b - a = 1.
        assertEquals(1.0, worst.get()[1] - worst.get()[0], 1e-9);
    }
}
