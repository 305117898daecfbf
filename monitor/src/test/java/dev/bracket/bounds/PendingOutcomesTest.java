package dev.bracket.bounds;

import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.util.Map;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Arms with pending outcomes (exposed units whose outcome has not arrived), checked against the
 * worst-case bounds of Horowitz &amp; Manski (2000, JASA 95(449)) worked out by hand over units:
 * every unknown outcome, pending or counterfactual, is set to the end of [a, b] that makes the ATE
 * smallest (or largest), and the ATE is the difference of two means over all N units.
 */
class PendingOutcomesTest {

    private static final OutcomeRange UNIT = new OutcomeRange(0, 1);
    private static final AssumptionSet WORST = AssumptionSet.parse("worst-case");

    /** 300 treated observed with mean 0.9 and 100 pending; 700 control observed with mean 0.2. */
    private static ObservedArms issueExample() {
        return new ObservedArms(ArmStatistics.ofSummary(300, 0.9, 0).withExposures(400),
                ArmStatistics.ofSummary(700, 0.2, 0));
    }

    @Test
    @DisplayName("worst case with pending outcomes matches the unit-level hand computation")
    void worstCaseByHand() {
        // N = 1100. Lowest E[Y1]: 270 observed successes, everything else 0 -> 270/1100.
        // Highest E[Y0]: 140 observed + 400 treated units' counterfactuals at 1 -> 540/1100.
        // Highest E[Y1]: 270 + 100 pending + 700 counterfactuals at 1 -> 1070/1100; lowest E[Y0]: 140/1100.
        IdentifiedInterval iv = BoundCalculator.interval(issueExample(), UNIT, WORST);
        assertEquals((270.0 - 540.0) / 1100, iv.lower(), 1e-12);
        assertEquals((1070.0 - 140.0) / 1100, iv.upper(), 1e-12);
        assertEquals(-0.245455, iv.lower(), 5e-7);
        assertEquals(0.845455, iv.upper(), 5e-7);
    }

    @Test
    @DisplayName("missing-at-random gives the complete-case means with the exposure-based treated share")
    void missingAtRandomIsCompleteCase() {
        // p = 400/1100, mu1 = 0.9, mu0 = 0.2 in Manski's (1990) worst-case formula:
        // [p(mu1 - 1) + (1-p)(0 - mu0), p mu1 + (1-p)(1 - mu0)].
        double p = 400.0 / 1100;
        IdentifiedInterval iv = BoundCalculator.interval(issueExample(), UNIT, AssumptionSet.parse("missing-at-random"));
        assertEquals(p * (0.9 - 1) + (1 - p) * (0 - 0.2), iv.lower(), 1e-12);
        assertEquals(p * 0.9 + (1 - p) * (1 - 0.2), iv.upper(), 1e-12);
        IdentifiedInterval both = BoundCalculator.interval(issueExample(), UNIT, AssumptionSet.parse("missing-at-random,worst-case"));
        assertEquals(iv, both);
    }

    @Test
    @DisplayName("without pending outcomes every assumption set gives exactly what it gave before exposures existed")
    void noPendingChangesNothing() {
        ObservedArms plain = new ObservedArms(ArmStatistics.of(0.2, 0.9, 0.4), ArmStatistics.of(0.1, 0.3));
        ObservedArms exposed = new ObservedArms(ArmStatistics.of(0.2, 0.9, 0.4).withExposures(3),
                ArmStatistics.of(0.1, 0.3).withExposures(2));
        for (AssumptionSet set : AssumptionSet.eachSingle()) {
            IdentifiedInterval before = BoundCalculator.interval(plain.treatedShare(), plain.treated().mean(),
                    plain.control().mean(), UNIT, set);
            assertEquals(before, BoundCalculator.interval(plain, UNIT, set), set.toString());
            assertEquals(before, BoundCalculator.interval(exposed, UNIT, set), set.toString());
        }
    }

    @Test
    @DisplayName("an arm whose outcomes are all pending gives a finite interval, never NaN")
    void allPending() {
        ObservedArms arms = new ObservedArms(ArmStatistics.empty().withExposures(5), ArmStatistics.of(0, 1, 1, 0));
        for (AssumptionSet set : AssumptionSet.eachSingle()) {
            IdentifiedInterval iv = BoundCalculator.interval(arms, UNIT, set);
            assertTrue(iv.isBounded(), set + ": " + iv);
            assertTrue(Double.isFinite(iv.lower()) && Double.isFinite(iv.upper()), set + ": " + iv);
        }
        // Worst case over units (N = 9): E[Y1] in [0, (5 + 4)/9] (no treated outcome known), E[Y0] in [2/9, (2 + 5)/9].
        IdentifiedInterval worst = BoundCalculator.interval(arms, UNIT, WORST);
        assertEquals(-7.0 / 9, worst.lower(), 1e-12);
        assertEquals(9.0 / 9 - 2.0 / 9, worst.upper(), 1e-12);
    }

    @Test
    @DisplayName("outcomes beyond the exposures are counted, not pending, and do not break the bounds")
    void excessOutcomes() {
        ArmStatistics arm = ArmStatistics.of(1, 0, 1).withExposures(2);
        assertEquals(1, arm.excessOutcomes());
        assertEquals(0, arm.pending());
        assertEquals(3, arm.units());
        assertEquals(0, ArmStatistics.of(1, 0, 1).excessOutcomes(), "no exposures reported: nothing to compare with");
        assertTrue(BoundCalculator.interval(new ObservedArms(arm, ArmStatistics.of(0.5)), UNIT, WORST).isBounded());
    }

    @Test
    @DisplayName("exposures and outcomes merge additively in any grouping")
    void additive() {
        ArmStatistics a = ArmStatistics.of(0.5).withExposures(3);
        ArmStatistics b = ArmStatistics.of(0.25, 0.75);
        ArmStatistics c = ArmStatistics.empty().withExposures(4);
        ArmStatistics left = a.merge(b).merge(c);
        ArmStatistics right = a.merge(b.merge(c));
        assertEquals(7, left.exposed());
        assertEquals(3, left.count());
        assertEquals(left.exposed(), right.exposed());
        assertEquals(4, left.pending());
    }

    @Test
    @DisplayName("instrument levels with pending outcomes: worst case equals Manski's intersection over hand-made level bounds")
    void instrumentWithPending() {
        // Level z0: treated 2 observed (mean 1) + 2 pending, control 4 observed (mean 0). N = 8, p = 1/2.
        //   E[Y1|z0] in [ (2 + 0)/8 , (2 + 2 + 4)/8 ] = [0.25, 1];  E[Y0|z0] in [0, 4/8] = [0, 0.5].
        // Level z1: treated 2 observed (mean 0.5), control 2 observed (mean 0.5). N = 4, p = 1/2.
        //   E[Y1|z1] in [1/4, 3/4];  E[Y0|z1] in [1/4, 3/4].
        // Intersection: E[Y1] in [0.25, 0.75], E[Y0] in [0.25, 0.5] -> ATE in [-0.25, 0.5].
        Map<String, ObservedArms> levels = Map.of(
                "z0", new ObservedArms(ArmStatistics.of(1, 1).withExposures(4), ArmStatistics.of(0, 0, 0, 0)),
                "z1", new ObservedArms(ArmStatistics.of(0, 1), ArmStatistics.of(0, 1)));
        IdentifiedInterval iv = InstrumentBounds.interval(levels, UNIT, WORST);
        assertEquals(-0.25, iv.lower(), 1e-12);
        assertEquals(0.5, iv.upper(), 1e-12);
    }
}
