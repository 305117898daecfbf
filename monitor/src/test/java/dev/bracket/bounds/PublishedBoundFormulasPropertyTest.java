package dev.bracket.bounds;

import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.Collections;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.SplittableRandom;
import java.util.function.BiConsumer;

import static org.junit.jupiter.api.Assertions.assertAll;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The engine against the closed-form bounds printed in the papers, recomputed here from the
 * papers' formulas for E[Y1] and E[Y0] (not from the engine's table of constraints on m10, m01).
 * Notation: p = P(T=1), mu1 = E[Y|T=1], mu0 = E[Y|T=0], outcomes in [a, b], higher better.
 */
class PublishedBoundFormulasPropertyTest {

    /** Seed of the generated cells; with the case number in a failure's name it replays the case. */
    private static final long SEED = 19900501L;
    private static final String NAME = "seed " + SEED + ", case {index}: {0}";
    private static final List<Cell> CELLS = SeededCases.generate(SEED, 500, Cell::random);

    /** A plausible slip: the arms' means passed in the wrong order. */
    private static final Engines.FromMeans SWAPPED_MEANS =
            (p, mu1, mu0, range, assumptions) -> BoundCalculator.interval(p, mu0, mu1, range, assumptions);

    /** One cell's observable quantities and its declared range. */
    record Cell(double a, double b, double p, double mu1, double mu0) {

        /** a in [-100, 100), width in [0.001, 200), p in [0.001, 0.999), means anywhere in [a, b] including its ends. */
        static Cell random(SplittableRandom r) {
            double a = r.nextDouble(-100, 100);
            double w = r.nextDouble(1e-3, 200);
            double p = r.nextDouble(1e-3, 1 - 1e-3);
            return new Cell(a, a + w, p, a + SeededCases.unitWithEnds(r) * w, a + SeededCases.unitWithEnds(r) * w);
        }

        OutcomeRange range() {
            return new OutcomeRange(a, b, Direction.HIGHER);
        }

        IdentifiedInterval interval(Engines.FromMeans engine, String assumptions) {
            return engine.interval(p, mu1, mu0, range(), AssumptionSet.parse(assumptions));
        }

        /** Rounding allowance for sums of a few products at the scale of the range. */
        double tolerance() {
            return 1e-12 * (Math.abs(a) + Math.abs(b));
        }

        // Manski (1990), AER P&P 80(2): with no assumption, E[Y1] in [p mu1 + (1-p) a, p mu1 + (1-p) b]
        // and E[Y0] in [(1-p) mu0 + p a, (1-p) mu0 + p b]; the ATE bounds are the differences.
        double worstLower() {
            return (p * mu1 + (1 - p) * a) - ((1 - p) * mu0 + p * b);
        }

        double worstUpper() {
            return (p * mu1 + (1 - p) * b) - ((1 - p) * mu0 + p * a);
        }
    }

    static List<Cell> cells() {
        return CELLS;
    }

    /** Each published formula, by name, as a check of an engine on one cell. */
    private static final Map<String, BiConsumer<Cell, Engines.FromMeans>> CHECKS = checks();

    private static Map<String, BiConsumer<Cell, Engines.FromMeans>> checks() {
        Map<String, BiConsumer<Cell, Engines.FromMeans>> checks = new LinkedHashMap<>();
        checks.put("worst case: width b - a, contains 0 (Manski 1990)", PublishedBoundFormulasPropertyTest::worstCase);
        checks.put("MTR: lower bound exactly 0 (Manski 1997)", PublishedBoundFormulasPropertyTest::monotoneResponse);
        checks.put("MTS: the naive difference bounds the effect (Manski & Pepper 2000)",
                PublishedBoundFormulasPropertyTest::monotoneSelection);
        checks.put("MTR and MTS: [0, mu1 - mu0], refuted when mu1 < mu0 (Manski & Pepper 2000)",
                PublishedBoundFormulasPropertyTest::monotoneResponseAndSelection);
        checks.put("optimizing selection: [(1-p)(a - mu0), p (mu1 - a)] (Manski 1990)",
                PublishedBoundFormulasPropertyTest::optimizingSelection);
        return Collections.unmodifiableMap(checks);
    }

    @ParameterizedTest(name = NAME)
    @MethodSource("cells")
    @DisplayName("the engine matches every published formula")
    void engineMatchesThePublishedFormulas(Cell c) {
        assertAll(CHECKS.entrySet().stream().map(check -> () -> {
            try {
                check.getValue().accept(c, Engines.FromMeans.REAL);
            } catch (AssertionError e) {
                throw new AssertionError(check.getKey() + ": " + e.getMessage(), e);
            }
        }));
    }

    @Test
    @DisplayName("each check fails for an engine that swaps the arms' means")
    void eachCheckFailsForAnEngineThatSwapsTheMeans() {
        assertAll(CHECKS.entrySet().stream().map(check -> () -> SeededCases.assertRejectsSome(
                CELLS, c -> check.getValue().accept(c, SWAPPED_MEANS), check.getKey() + ", swapped means")));
    }

    static void worstCase(Cell c, Engines.FromMeans engine) {
        // Manski (1990), AER P&P 80(2): width b - a whatever the data; always contains 0.
        IdentifiedInterval iv = c.interval(engine, "worst-case");
        assertEquals(c.worstLower(), iv.lower(), c.tolerance());
        assertEquals(c.worstUpper(), iv.upper(), c.tolerance());
        assertEquals(c.b() - c.a(), iv.width(), c.tolerance());
        assertTrue(iv.lower() <= 0 && 0 <= iv.upper(), "worst case must contain 0: " + iv);
    }

    static void monotoneResponse(Cell c, Engines.FromMeans engine) {
        // Manski (1997), Econometrica 65(6), MTR: under Y1 >= Y0, E[Y1] in [E[Y], p mu1 + (1-p) b]
        // and E[Y0] in [(1-p) mu0 + p a, E[Y]] with E[Y] = p mu1 + (1-p) mu0, so the ATE lies in
        // [0, worst-case upper]. The lower end must be exactly 0, or a sign could appear from rounding.
        IdentifiedInterval positive = c.interval(engine, "mtr-positive");
        assertEquals(0.0, positive.lower(), 0.0);
        assertEquals(c.worstUpper(), positive.upper(), c.tolerance());
        // Reverse direction (Y1 <= Y0): [worst-case lower, 0].
        IdentifiedInterval negative = c.interval(engine, "mtr-negative");
        assertEquals(c.worstLower(), negative.lower(), c.tolerance());
        assertEquals(0.0, negative.upper(), 0.0);
    }

    static void monotoneSelection(Cell c, Engines.FromMeans engine) {
        // Manski & Pepper (2000), Econometrica 68(4), MTS (recalled from memory): E[Y1] in
        // [p mu1 + (1-p) a, mu1] and E[Y0] in [mu0, (1-p) mu0 + p b], so the ATE lies in
        // [worst-case lower, mu1 - mu0]; MTS alone leaves the lower end where no assumption puts it.
        // The same ATE interval is stated, citing Manski & Pepper (2000), in an applied text found at
        // lawinsider.com/clause/monotone-treatment-selection; the paper itself not seen.
        IdentifiedInterval mts = c.interval(engine, "mts-positive");
        double y1Low = c.p() * c.mu1() + (1 - c.p()) * c.a();
        double y0High = (1 - c.p()) * c.mu0() + c.p() * c.b();
        assertEquals(y1Low - y0High, mts.lower(), c.tolerance());
        assertEquals(c.mu1() - c.mu0(), mts.upper(), c.tolerance());
        // Reverse direction: [mu1 - mu0, worst-case upper].
        IdentifiedInterval mtsNegative = c.interval(engine, "mts-negative");
        assertEquals(c.mu1() - c.mu0(), mtsNegative.lower(), c.tolerance());
        assertEquals(c.worstUpper(), mtsNegative.upper(), c.tolerance());
    }

    static void monotoneResponseAndSelection(Cell c, Engines.FromMeans engine) {
        // Manski & Pepper (2000), Econometrica 68(4), MTR and MTS together: E[Y1] in [E[Y], mu1],
        // E[Y0] in [mu0, E[Y]], so ATE in [0, mu1 - mu0]; if mu1 < mu0 the two assumptions
        // contradict the data.
        IdentifiedInterval iv = c.interval(engine, "mtr-positive,mts-positive");
        if (c.mu1() >= c.mu0()) {
            assertTrue(iv.isBounded(), "mu1 >= mu0 must be compatible: " + c);
            assertEquals(0.0, iv.lower(), 0.0);
            assertEquals(c.mu1() - c.mu0(), iv.upper(), c.tolerance());
        } else if (c.mu0() - c.mu1() > 1e-9 * (Math.abs(c.a()) + Math.abs(c.b()))) {
            // Beyond rounding (OutcomeRange.roundingSlack) a smaller treated mean refutes the pair.
            assertEquals(BoundStatus.REFUTED, iv.status(), c.toString());
        }
    }

    static void optimizingSelection(Cell c, Engines.FromMeans engine) {
        // Manski (1990), AER P&P 80(2), outcome-optimization (Roy 1951) model, section recalled from
        // memory: untreated units have Y1 <= Y0 and treated Y0 <= Y1, so E[Y1] in
        // [p mu1 + (1-p) a, p mu1 + (1-p) mu0] and E[Y0] in [(1-p) mu0 + p a, (1-p) mu0 + p mu1];
        // the ATE lies in [(1-p)(a - mu0), p (mu1 - a)].
        IdentifiedInterval iv = c.interval(engine, "optimizing-selection");
        assertEquals((1 - c.p()) * (c.a() - c.mu0()), iv.lower(), c.tolerance());
        assertEquals(c.p() * (c.mu1() - c.a()), iv.upper(), c.tolerance());
    }
}
