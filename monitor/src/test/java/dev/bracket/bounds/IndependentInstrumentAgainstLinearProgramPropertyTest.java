package dev.bracket.bounds;

import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.ArrayList;
import java.util.EnumSet;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.Set;
import java.util.SplittableRandom;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The engine's bounds under an independent instrument ({@link IndependentInstrumentBounds}) against
 * {@link PotentialTreatmentsProgram}, a linear program written in the test from the meaning of
 * the assumptions over the joint law of (potential treatments at every level, Y0, Y1): for
 * random binary-outcome data with 2 or 3 instrument levels, every single assumption, every pair
 * and one random larger set, in both outcome directions and on shifted and scaled outcome
 * ranges, the intervals must agree and "refuted" must coincide with infeasibility. Also: the
 * bounds lie inside the mean-independence bounds (Manski 1990), since independence implies mean
 * independence.
 */
class IndependentInstrumentAgainstLinearProgramPropertyTest {

    /** Seed of the generated cases; with the case number in a failure's name it replays the case. */
    private static final long SEED = 19950818L;
    private static final List<Case> CASES = SeededCases.generate(SEED, 120, Case::random);

    private static final List<Set<Assumption>> SETS = SharpnessAgainstLinearProgramPropertyTest.singlesAndPairs();

    /** A plausible slip: an off-by-one in the loop over levels, so the last level is never seen. */
    private static final Engines.FromLevels LAST_LEVEL_DROPPED = (levels, range, assumptions) -> {
        Map<String, ObservedArms> allButLast = new LinkedHashMap<>(levels);
        allButLast.remove("z" + (levels.size() - 1));
        return IndependentInstrumentBounds.interval(allButLast, range, assumptions);
    };

    /** Counts for 2 or 3 levels, one set of three or more assumptions, and the outcome range [a, b] the counts' 0 and 1 stand for. */
    record Case(InstrumentLevelCounts data, Set<Assumption> larger, double a, double b) {

        static Case random(SplittableRandom r) {
            double[] ends = SeededCases.oneOf(r, new double[] {0, 1}, new double[] {-1, 2}, new double[] {10, 10.5});
            return new Case(InstrumentLevelCounts.random(r, 2, 3, 5),
                    SharpnessAgainstLinearProgramPropertyTest.Case.largerSet(r), ends[0], ends[1]);
        }

        PotentialTreatmentsProgram program() {
            return new PotentialTreatmentsProgram(a, b, data.probabilities());
        }

        @Override
        public String toString() {
            return data + ", larger set " + AssumptionSet.of(larger) + ", range " + a + ".." + b;
        }
    }

    static List<Case> cases() {
        return CASES;
    }

    @ParameterizedTest(name = "seed " + SEED + ", case {index}: {0}")
    @MethodSource("cases")
    @DisplayName("the engine equals the linear program over potential treatments, inside the mean-independence bounds")
    void engineEqualsProgramOverPotentialTreatments(Case c) {
        equalsProgram(c, Engines.FromLevels.REAL);
    }

    @Test
    @DisplayName("the generated data reach both refuted and bounded worst-case programs")
    void generatedDataCoverRefutationAndBounds() {
        // Both branches of the check must really be exercised; decided by the test's own program.
        long refuted = CASES.stream()
                .filter(c -> c.program().ateRange(EnumSet.of(Assumption.WORST_CASE), Direction.HIGHER).isEmpty()).count();
        System.out.printf("worst-case program infeasible in %d of %d cases%n", refuted, CASES.size());
        assertTrue(refuted >= 5, "infeasible in only " + refuted + " cases");
        assertTrue(CASES.size() - refuted >= 20, "feasible in only " + (CASES.size() - refuted) + " cases");
    }

    @Test
    @DisplayName("the check fails for an engine that drops the last instrument level")
    void failsForAnEngineThatDropsTheLastLevel() {
        SeededCases.assertRejectsSome(CASES, c -> equalsProgram(c, LAST_LEVEL_DROPPED), "last level dropped");
    }

    static void equalsProgram(Case c, Engines.FromLevels engine) {
        InstrumentLevelCounts data = c.data();
        PotentialTreatmentsProgram program = c.program();
        List<Set<Assumption>> sets = new ArrayList<>(SETS);
        sets.add(c.larger());
        for (Direction better : Direction.values()) {
            OutcomeRange range = new OutcomeRange(c.a(), c.b(), better, OutcomeKind.BINARY);
            Map<String, ObservedArms> levels = data.arms(range);
            double tolerance = 1e-7 * range.width();
            for (Set<Assumption> set : sets) {
                AssumptionSet independent = AssumptionSet.of(set).withInstrument(InstrumentAssumption.INDEPENDENT);
                IdentifiedInterval interval = engine.interval(levels, range, independent);
                Optional<double[]> lp = program.ateRange(set, better);
                String where = independent + ", " + better.id() + " better, range " + range.min() + ".." + range.max() + ", " + data;
                if (lp.isEmpty()) {
                    assertEquals(BoundStatus.REFUTED, interval.status(), "program infeasible but engine not refuted: " + where);
                } else {
                    assertTrue(interval.isBounded(), "program feasible but engine says " + interval.status().id() + ": " + where);
                    assertEquals(lp.get()[0], interval.lower(), tolerance, "lower end: " + where);
                    assertEquals(lp.get()[1], interval.upper(), tolerance, "upper end: " + where);
                }

                IdentifiedInterval meanIndependent = InstrumentBounds.interval(levels, range, AssumptionSet.of(set));
                if (interval.isBounded()) {
                    // Independence implies mean independence (Manski 1990): never wider, never refuted less.
                    assertTrue(meanIndependent.isBounded(), "mean independence refuted but independence not: " + where);
                    assertTrue(interval.lower() >= meanIndependent.lower() - tolerance && interval.upper() <= meanIndependent.upper() + tolerance,
                            "independent " + interval + " not inside mean-independent " + meanIndependent + ": " + where);
                }
            }
        }
    }
}
