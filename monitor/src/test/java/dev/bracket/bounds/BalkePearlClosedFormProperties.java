package dev.bracket.bounds;

import net.jqwik.api.Arbitrary;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import net.jqwik.api.Provide;
import net.jqwik.api.statistics.Statistics;

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
 * Data: random counts, decided in exact integer arithmetic, so cases on the boundary of the
 * inequality (common: one-sided non-compliance meets it with equality) are included.
 */
class BalkePearlClosedFormProperties {

    private static final OutcomeRange BINARY = new OutcomeRange(0, 1, Direction.HIGHER, OutcomeKind.BINARY);
    private static final AssumptionSet INDEPENDENT = AssumptionSet.parse("worst-case").withInstrument(InstrumentAssumption.INDEPENDENT);

    @Provide
    Arbitrary<InstrumentLevelCounts> twoLevels() {
        return InstrumentLevelCounts.arbitrary(2, 2, 6);
    }

    @Provide
    Arbitrary<InstrumentLevelCounts> threeLevels() {
        return InstrumentLevelCounts.arbitrary(3, 3, 6);
    }

    @Property(tries = 400)
    void twoLevelsMatchTheClosedFormsAndRefuteExactlyWhenTheInequalityFails(@ForAll("twoLevels") InstrumentLevelCounts data) {
        IdentifiedInterval engine = refutedWhenTheInequalityFails(data);
        if (!data.instrumentalInequalityHolds()) {
            return;
        }
        assertTrue(engine.isIdentified(), "inequality holds but engine says " + engine.status().id() + ": " + data);
        double[] closed = closedForm(data.probabilities());
        assertEquals(closed[0], engine.lower(), 1e-9, "lower bound: " + data);
        assertEquals(closed[1], engine.upper(), 1e-9, "upper bound: " + data);
        Statistics.label("narrower than mean independence").collect(
                engine.width() < InstrumentBounds.interval(data.arms(BINARY), BINARY, AssumptionSet.parse("worst-case")).width() - 1e-9);
    }

    @Property(tries = 150)
    void threeLevelsAreRefutedWheneverTheInequalityFails(@ForAll("threeLevels") InstrumentLevelCounts data) {
        refutedWhenTheInequalityFails(data);
    }

    /** The engine's interval, checked to be refuted if the instrumental inequality fails. */
    private static IdentifiedInterval refutedWhenTheInequalityFails(InstrumentLevelCounts data) {
        IdentifiedInterval engine = IndependentInstrumentBounds.interval(data.arms(BINARY), BINARY, INDEPENDENT);
        boolean holds = data.instrumentalInequalityHolds();
        Statistics.label("instrumental inequality").collect(holds ? "holds" : "fails");
        if (!holds) {
            assertEquals(BoundStatus.REFUTED, engine.status(), "inequality fails but engine says " + engine.status().id() + ": " + data);
        }
        return engine;
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
