package dev.bracket.bounds;

import net.jqwik.api.Arbitraries;
import net.jqwik.api.Arbitrary;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import net.jqwik.api.Provide;
import net.jqwik.api.statistics.Statistics;

import java.util.ArrayList;
import java.util.List;
import java.util.Optional;
import java.util.Set;

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
class IndependentInstrumentAgainstLinearProgramProperties {

    private static final List<Set<Assumption>> SETS = SharpnessAgainstLinearProgramProperties.singlesAndPairs();

    @Provide
    Arbitrary<InstrumentLevelCounts> data() {
        return InstrumentLevelCounts.arbitrary(2, 3, 5);
    }

    @Provide
    Arbitrary<Set<Assumption>> largerSet() {
        return SharpnessAgainstLinearProgramProperties.largerSets();
    }

    @Provide
    Arbitrary<double[]> range() {
        return Arbitraries.of(new double[] {0, 1}, new double[] {-1, 2}, new double[] {10, 10.5});
    }

    @Property(tries = 120)
    void engineEqualsProgramOverPotentialTreatments(@ForAll("data") InstrumentLevelCounts data,
                                                    @ForAll("largerSet") Set<Assumption> larger,
                                                    @ForAll("range") double[] ends) {
        PotentialTreatmentsProgram program = new PotentialTreatmentsProgram(ends[0], ends[1], data.probabilities());
        List<Set<Assumption>> sets = new ArrayList<>(SETS);
        sets.add(larger);
        for (Direction better : Direction.values()) {
            OutcomeRange range = new OutcomeRange(ends[0], ends[1], better, OutcomeKind.BINARY);
            double tolerance = 1e-7 * range.width();
            for (Set<Assumption> set : sets) {
                AssumptionSet independent = AssumptionSet.of(set).withInstrument(InstrumentAssumption.INDEPENDENT);
                IdentifiedInterval engine = IndependentInstrumentBounds.interval(data.arms(range), range, independent);
                Optional<double[]> lp = program.ateRange(set, better);
                String where = independent + ", " + better.id() + " better, range " + range.min() + ".." + range.max() + ", " + data;
                if (lp.isEmpty()) {
                    assertEquals(BoundStatus.REFUTED, engine.status(), "program infeasible but engine not refuted: " + where);
                } else {
                    assertTrue(engine.isIdentified(), "program feasible but engine says " + engine.status().id() + ": " + where);
                    assertEquals(lp.get()[0], engine.lower(), tolerance, "lower end: " + where);
                    assertEquals(lp.get()[1], engine.upper(), tolerance, "upper end: " + where);
                }
                Statistics.label(set.size() == 1 ? set.iterator().next().id() : "sets").collect(engine.status().id());

                IdentifiedInterval meanIndependent = InstrumentBounds.interval(data.arms(range), range, AssumptionSet.of(set));
                if (engine.isIdentified()) {
                    // Independence implies mean independence (Manski 1990): never wider, never refuted less.
                    assertTrue(meanIndependent.isIdentified(), "mean independence refuted but independence not: " + where);
                    assertTrue(engine.lower() >= meanIndependent.lower() - tolerance && engine.upper() <= meanIndependent.upper() + tolerance,
                            "independent " + engine + " not inside mean-independent " + meanIndependent + ": " + where);
                }
            }
        }
        // Both branches must really be exercised.
        Statistics.label("worst-case").coverage(c -> {
            c.check("refuted").count(n -> n >= 5);
            c.check("identified").count(n -> n >= 20);
        });
    }
}
