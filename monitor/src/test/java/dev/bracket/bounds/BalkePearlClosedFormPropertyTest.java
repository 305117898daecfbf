package dev.bracket.bounds;

import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.stream.DoubleStream;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The engine's linear programs under an independent instrument against published formulas:
 * <ul>
 *   <li>the closed-form sharp bounds of Balke &amp; Pearl (1997), JASA 92(439), for a binary
 *       instrument, as restated in Pearl, <i>Causality</i> (2nd ed. 2009), eqs. (8.14)–(8.15):
 *       the lower bound is the largest and the upper bound the smallest of eight sums of the
 *       probabilities {@code p(y, x | z)} (recalled from memory);</li>
 *   <li>Pearl's (1995, UAI-95, "On the testability of causal models with latent and
 *       instrumental variables") instrumental inequality
 *       {@code max_x sum_y max_z p(y, x | z) <= 1}: necessary for every instrument, and for a
 *       binary instrument with binary treatment and outcome also sufficient (ibid.; recalled
 *       from memory), so the engine must report "refuted" exactly when it fails with two levels,
 *       and whenever it fails with three.</li>
 * </ul>
 * Data: random counts ({@link InstrumentLevelCounts#random}), decided in exact integer
 * arithmetic, so cases on the boundary of the inequality (common: one-sided non-compliance meets
 * it with equality) are included.
 */
class BalkePearlClosedFormPropertyTest {

    /** Seed of the generated counts; with the case number in a failure's name it replays the case. */
    private static final long SEED = 19970915L;
    private static final List<InstrumentLevelCounts> TWO_LEVELS =
            SeededCases.generate(SEED, 400, r -> InstrumentLevelCounts.random(r, 2, 2, 6));
    private static final List<InstrumentLevelCounts> THREE_LEVELS =
            SeededCases.generate(SEED, 150, r -> InstrumentLevelCounts.random(r, 3, 3, 6));

    private static final OutcomeRange BINARY = new OutcomeRange(0, 1, Direction.HIGHER, OutcomeKind.BINARY);
    private static final AssumptionSet WORST_CASE = AssumptionSet.parse("worst-case");
    private static final AssumptionSet INDEPENDENT = WORST_CASE.withInstrument(InstrumentAssumption.INDEPENDENT);

    /** A plausible slip: the instrument assumption dropped, so the mean-independence bounds (Manski 1990) come back. */
    private static final Engines.FromLevels MEAN_INDEPENDENCE_ONLY = (levels, range, assumptions) ->
            InstrumentBounds.interval(levels, range, assumptions.withInstrument(InstrumentAssumption.MEAN_INDEPENDENT));

    /**
     * A plausible slip that loses data: levels with an empty arm skipped as if they had no units.
     * (Mean independence alone cannot fail the refutation check: for a binary outcome Manski's
     * worst-case bounds on E[Y1] at levels z and z' are disjoint exactly when
     * {@code p(1, 1 | z) + p(0, 1 | z') > 1}, and on E[Y0] likewise, which is the instrumental
     * inequality failing, so both engines refute the same cases.)
     */
    private static final Engines.FromLevels ONE_ARM_LEVELS_SKIPPED = (levels, range, assumptions) -> {
        Map<String, ObservedArms> bothArms = new LinkedHashMap<>(levels);
        bothArms.values().removeIf(arms -> arms.treated().count() == 0 || arms.control().count() == 0);
        return IndependentInstrumentBounds.interval(bothArms, range, assumptions);
    };

    static List<InstrumentLevelCounts> twoLevels() {
        return TWO_LEVELS;
    }

    static List<InstrumentLevelCounts> threeLevels() {
        return THREE_LEVELS;
    }

    @ParameterizedTest(name = "seed " + SEED + ", case {index}: {0}")
    @MethodSource("twoLevels")
    @DisplayName("two levels: Balke & Pearl's closed forms, and refuted exactly when the instrumental inequality fails")
    void twoLevelsMatchTheClosedFormsAndRefuteExactlyWhenTheInequalityFails(InstrumentLevelCounts data) {
        matchesTheClosedForms(data, Engines.FromLevels.REAL);
    }

    @ParameterizedTest(name = "seed " + SEED + ", case {index}: {0}")
    @MethodSource("threeLevels")
    @DisplayName("three levels: refuted whenever the instrumental inequality fails")
    void threeLevelsAreRefutedWheneverTheInequalityFails(InstrumentLevelCounts data) {
        refutedWhenTheInequalityFails(data, Engines.FromLevels.REAL);
    }

    @Test
    @DisplayName("the generated counts reach both sides of the instrumental inequality, its boundary, and two-sided compliance")
    void generatedCountsCoverBothSidesOfTheInequalityAndItsBoundary() {
        long strict = TWO_LEVELS.stream().filter(d -> d.instrumentalInequalitySign() < 0).count();
        long equal = TWO_LEVELS.stream().filter(d -> d.instrumentalInequalitySign() == 0).count();
        long fails = TWO_LEVELS.stream().filter(d -> d.instrumentalInequalitySign() > 0).count();
        long oneArm = TWO_LEVELS.stream().filter(InstrumentLevelCounts::someLevelWithOneArm).count();
        // Where independence says more than mean independence: the closed forms narrower than Manski's (1990) bounds.
        long narrower = TWO_LEVELS.stream().filter(InstrumentLevelCounts::instrumentalInequalityHolds).filter(d -> {
            double[] closed = closedForm(d.probabilities());
            return closed[1] - closed[0] < InstrumentBounds.interval(d.arms(BINARY), BINARY, WORST_CASE).width() - 1e-9;
        }).count();
        long threeFail = THREE_LEVELS.stream().filter(d -> !d.instrumentalInequalityHolds()).count();
        System.out.printf("two levels (%d): inequality strict %d, equal %d, fails %d; a level with one arm %d;"
                        + " narrower than mean independence %d; three levels (%d): fails %d%n",
                TWO_LEVELS.size(), strict, equal, fails, oneArm, narrower, THREE_LEVELS.size(), threeFail);
        long tenth = TWO_LEVELS.size() / 10;
        assertTrue(strict >= tenth && equal >= tenth && fails >= tenth,
                "each side of the inequality and its boundary in at least " + tenth + " two-level cases");
        assertTrue(oneArm >= tenth, "one-sided non-compliance in only " + oneArm + " cases");
        assertTrue(narrower >= tenth, "narrower than mean independence in only " + narrower + " cases");
        assertTrue(threeFail >= THREE_LEVELS.size() / 10, "the inequality fails in only " + threeFail + " three-level cases");
    }

    @Test
    @DisplayName("the two-level check fails for an engine that assumes mean independence only")
    void twoLevelCheckFailsForMeanIndependenceOnly() {
        SeededCases.assertRejectsSome(TWO_LEVELS, d -> matchesTheClosedForms(d, MEAN_INDEPENDENCE_ONLY), "mean independence only");
    }

    @Test
    @DisplayName("the three-level check fails for an engine that skips levels with an empty arm")
    void threeLevelCheckFailsForAnEngineThatSkipsLevelsWithAnEmptyArm() {
        SeededCases.assertRejectsSome(THREE_LEVELS, d -> refutedWhenTheInequalityFails(d, ONE_ARM_LEVELS_SKIPPED), "levels with an empty arm skipped");
    }

    /** Checks that the engine's interval is refuted exactly when the inequality fails and otherwise equals the closed forms. */
    static void matchesTheClosedForms(InstrumentLevelCounts data, Engines.FromLevels engine) {
        IdentifiedInterval interval = refutedWhenTheInequalityFails(data, engine);
        if (!data.instrumentalInequalityHolds()) {
            return;
        }
        assertTrue(interval.isBounded(), "inequality holds but engine says " + interval.status().id() + ": " + data);
        double[] closed = closedForm(data.probabilities());
        assertEquals(closed[0], interval.lower(), 1e-9, "lower bound: " + data);
        assertEquals(closed[1], interval.upper(), 1e-9, "upper bound: " + data);
    }

    /** The engine's interval, checked to be refuted if the instrumental inequality fails. */
    static IdentifiedInterval refutedWhenTheInequalityFails(InstrumentLevelCounts data, Engines.FromLevels engine) {
        IdentifiedInterval interval = engine.interval(data.arms(BINARY), BINARY, INDEPENDENT);
        if (!data.instrumentalInequalityHolds()) {
            assertEquals(BoundStatus.REFUTED, interval.status(), "inequality fails but engine says " + interval.status().id() + ": " + data);
        }
        return interval;
    }

    /**
     * Balke &amp; Pearl's bounds with {@code p(y, x | z)} written {@code pYXZ} (outcome, treatment,
     * instrument), recalled from Pearl (2009), eqs. (8.14) and (8.15).
     */
    static double[] closedForm(double[][][] p) {
        // p[z][t][y] = P(T = t, Y = y | Z = z)
        double p000 = p[0][0][0], p001 = p[1][0][0];
        double p010 = p[0][1][0], p011 = p[1][1][0];
        double p100 = p[0][0][1], p101 = p[1][0][1];
        double p110 = p[0][1][1], p111 = p[1][1][1];
        double lower = DoubleStream.of(
                p111 + p000 - 1,
                p110 + p001 - 1,
                p110 - p111 - p101 - p010 - p100,
                p111 - p110 - p100 - p011 - p101,
                -p011 - p101,
                -p010 - p100,
                p001 - p011 - p101 - p010 - p000,
                p000 - p010 - p100 - p011 - p001).max().getAsDouble();
        double upper = DoubleStream.of(
                1 - p011 - p100,
                1 - p010 - p101,
                -p010 + p011 + p001 + p110 + p000,
                -p011 + p111 + p001 + p010 + p000,
                p111 + p001,
                p110 + p000,
                -p101 + p111 + p001 + p110 + p100,
                -p100 + p110 + p000 + p111 + p101).min().getAsDouble();
        return new double[] {lower, upper};
    }
}
