package dev.bracket.bounds;

import net.jqwik.api.Arbitraries;
import net.jqwik.api.Arbitrary;
import net.jqwik.api.Combinators;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import net.jqwik.api.Provide;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The engine against the closed-form bounds printed in the papers, recomputed here from the
 * papers' formulas for E[Y1] and E[Y0] (not from the engine's table of constraints on m10, m01).
 * Notation: p = P(T=1), mu1 = E[Y|T=1], mu0 = E[Y|T=0], outcomes in [a, b], higher better.
 */
class PublishedBoundFormulasProperties {

    /** One cell's observable quantities and its declared range. */
    record Cell(double a, double b, double p, double mu1, double mu0) {

        OutcomeRange range() {
            return new OutcomeRange(a, b, Direction.HIGHER);
        }

        IdentifiedInterval engine(String assumptions) {
            return BoundCalculator.interval(p, mu1, mu0, range(), AssumptionSet.parse(assumptions));
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

    @Provide
    Arbitrary<Cell> cells() {
        Arbitrary<Double> a = Arbitraries.doubles().between(-100, 100).ofScale(9);
        Arbitrary<Double> width = Arbitraries.doubles().between(1e-3, 200).ofScale(9);
        Arbitrary<Double> unit = Arbitraries.doubles().between(0, 1).ofScale(9);
        Arbitrary<Double> share = Arbitraries.doubles().between(1e-3, 1 - 1e-3).ofScale(9);
        return Combinators.combine(a, width, share, unit, unit)
                .as((lo, w, p, u1, u0) -> new Cell(lo, lo + w, p, lo + u1 * w, lo + u0 * w));
    }

    @Property(tries = 500)
    void worstCaseBoundsHaveWidthBMinusAAndContainZero(@ForAll("cells") Cell c) {
        // Manski (1990), AER P&P 80(2): width b - a whatever the data; always contains 0.
        IdentifiedInterval iv = c.engine("worst-case");
        assertEquals(c.worstLower(), iv.lower(), c.tolerance());
        assertEquals(c.worstUpper(), iv.upper(), c.tolerance());
        assertEquals(c.b() - c.a(), iv.width(), c.tolerance());
        assertTrue(iv.lower() <= 0 && 0 <= iv.upper(), "worst case must contain 0: " + iv);
    }

    @Property(tries = 500)
    void monotoneTreatmentResponseHasLowerBoundZero(@ForAll("cells") Cell c) {
        // Manski (1997), Econometrica 65(6), MTR: under Y1 >= Y0, E[Y1] in [E[Y], p mu1 + (1-p) b]
        // and E[Y0] in [(1-p) mu0 + p a, E[Y]] with E[Y] = p mu1 + (1-p) mu0, so the ATE lies in
        // [0, worst-case upper]. The lower end must be exactly 0, or a sign could appear from rounding.
        IdentifiedInterval positive = c.engine("mtr-positive");
        assertEquals(0.0, positive.lower(), 0.0);
        assertEquals(c.worstUpper(), positive.upper(), c.tolerance());
        // Reverse direction (Y1 <= Y0): [worst-case lower, 0].
        IdentifiedInterval negative = c.engine("mtr-negative");
        assertEquals(c.worstLower(), negative.lower(), c.tolerance());
        assertEquals(0.0, negative.upper(), 0.0);
    }

    @Property(tries = 500)
    void monotoneTreatmentSelectionBoundsTheEffectByTheNaiveDifference(@ForAll("cells") Cell c) {
        // Manski & Pepper (2000), Econometrica 68(4), MTS (recalled from memory): E[Y1] in
        // [p mu1 + (1-p) a, mu1] and E[Y0] in [mu0, (1-p) mu0 + p b], so the ATE lies in
        // [worst-case lower, mu1 - mu0]; MTS alone leaves the lower end where no assumption puts it.
        IdentifiedInterval mts = c.engine("mts-positive");
        double y1Low = c.p() * c.mu1() + (1 - c.p()) * c.a();
        double y0High = (1 - c.p()) * c.mu0() + c.p() * c.b();
        assertEquals(y1Low - y0High, mts.lower(), c.tolerance());
        assertEquals(c.mu1() - c.mu0(), mts.upper(), c.tolerance());
        // Reverse direction: [mu1 - mu0, worst-case upper].
        IdentifiedInterval mtsNegative = c.engine("mts-negative");
        assertEquals(c.mu1() - c.mu0(), mtsNegative.lower(), c.tolerance());
        assertEquals(c.worstUpper(), mtsNegative.upper(), c.tolerance());
    }

    @Property(tries = 500)
    void monotoneResponseWithMonotoneSelectionGivesZeroToNaiveDifference(@ForAll("cells") Cell c) {
        // Manski & Pepper (2000), Econometrica 68(4), MTR and MTS together: E[Y1] in [E[Y], mu1],
        // E[Y0] in [mu0, E[Y]], so ATE in [0, mu1 - mu0]; if mu1 < mu0 the two assumptions
        // contradict the data.
        IdentifiedInterval iv = c.engine("mtr-positive,mts-positive");
        if (c.mu1() >= c.mu0()) {
            assertTrue(iv.isBounded(), "mu1 >= mu0 must be compatible: " + c);
            assertEquals(0.0, iv.lower(), 0.0);
            assertEquals(c.mu1() - c.mu0(), iv.upper(), c.tolerance());
        } else if (c.mu0() - c.mu1() > 1e-9 * (Math.abs(c.a()) + Math.abs(c.b()))) {
            // Beyond rounding (OutcomeRange.roundingSlack) a smaller treated mean refutes the pair.
            assertEquals(BoundStatus.REFUTED, iv.status(), c.toString());
        }
    }

    @Property(tries = 500)
    void optimizingSelectionMatchesTheOutcomeOptimizationBounds(@ForAll("cells") Cell c) {
        // Manski (1990), AER P&P 80(2), outcome-optimization (Roy 1951) model, section recalled from
        // memory: untreated units have Y1 <= Y0 and treated Y0 <= Y1, so E[Y1] in
        // [p mu1 + (1-p) a, p mu1 + (1-p) mu0] and E[Y0] in [(1-p) mu0 + p a, (1-p) mu0 + p mu1];
        // the ATE lies in [(1-p)(a - mu0), p (mu1 - a)].
        IdentifiedInterval iv = c.engine("optimizing-selection");
        assertEquals((1 - c.p()) * (c.a() - c.mu0()), iv.lower(), c.tolerance());
        assertEquals(c.p() * (c.mu1() - c.a()), iv.upper(), c.tolerance());
    }
}
