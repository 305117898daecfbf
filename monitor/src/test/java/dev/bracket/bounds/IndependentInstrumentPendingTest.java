package dev.bracket.bounds;

import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

import java.util.LinkedHashMap;
import java.util.Map;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Independent-instrument bounds (binary outcome, Balke &amp; Pearl 1997 response-type programs)
 * with pending outcomes. Every way of filling in the pending outcomes with 0s and 1s is a
 * complete data set the truth could be (Horowitz &amp; Manski 2000, JASA 95(449)); the
 * pending-aware interval must hold the complete-data interval of each of them, and its ends must
 * be reached by them (binary outcomes: the mean of an arm fixes its law, so the box of arm means
 * is exactly the set of fillings' means, up to the grid of whole units). A complete-case
 * interval, which drops the pending units, fails the first check — the check can fail.
 */
class IndependentInstrumentPendingTest {

    private static final OutcomeRange BINARY = new OutcomeRange(0, 1, Direction.HIGHER, OutcomeKind.BINARY);

    /** Two levels with two-sided non-compliance; {ones, observed, pending} per arm (invented counts). */
    private static final int[][] Z0 = {{6, 10, 3}, {9, 30, 2}};
    private static final int[][] Z1 = {{18, 28, 3}, {3, 12, 2}};

    private static ArmStatistics arm(int ones, int observed, int pending, boolean exposures) {
        ArmStatistics s = ArmStatistics.empty();
        for (int i = 0; i < observed; i++) {
            s = s.add(i < ones ? 1 : 0);
        }
        return exposures ? s.withExposures(observed + pending) : s;
    }

    private static Map<String, ObservedArms> levels(int[][] z0, int[][] z1, boolean exposures) {
        Map<String, ObservedArms> levels = new LinkedHashMap<>();
        levels.put("0", new ObservedArms(arm(z0[0][0], z0[0][1], z0[0][2], exposures), arm(z0[1][0], z0[1][1], z0[1][2], exposures)));
        levels.put("1", new ObservedArms(arm(z1[0][0], z1[0][1], z1[0][2], exposures), arm(z1[1][0], z1[1][1], z1[1][2], exposures)));
        return levels;
    }

    /** The data with j0t, j0c, j1t, j1c of the pending outcomes equal to 1 and the rest 0, all observed. */
    private static Map<String, ObservedArms> filled(int j0t, int j0c, int j1t, int j1c) {
        int[][] z0 = {{Z0[0][0] + j0t, Z0[0][1] + Z0[0][2], 0}, {Z0[1][0] + j0c, Z0[1][1] + Z0[1][2], 0}};
        int[][] z1 = {{Z1[0][0] + j1t, Z1[0][1] + Z1[0][2], 0}, {Z1[1][0] + j1c, Z1[1][1] + Z1[1][2], 0}};
        return levels(z0, z1, false);
    }

    @ParameterizedTest(name = "{0}")
    @ValueSource(strings = {"worst-case", "mtr-positive", "mts-positive"})
    @DisplayName("the pending-aware interval holds every filling's interval and its ends are reached by fillings")
    void holdsEveryFilling(String set) {
        AssumptionSet assumptions = AssumptionSet.parse(set).withInstrument(InstrumentAssumption.INDEPENDENT);
        IdentifiedInterval pending = IndependentInstrumentBounds.interval(levels(Z0, Z1, true), BINARY, assumptions);
        IdentifiedInterval completeCase = IndependentInstrumentBounds.interval(levels(Z0, Z1, false), BINARY, assumptions);
        double lowest = Double.POSITIVE_INFINITY;
        double highest = Double.NEGATIVE_INFINITY;
        boolean completeCaseMisses = false;
        for (int a = 0; a <= Z0[0][2]; a++) {
            for (int b = 0; b <= Z0[1][2]; b++) {
                for (int c = 0; c <= Z1[0][2]; c++) {
                    for (int d = 0; d <= Z1[1][2]; d++) {
                        IdentifiedInterval complete = IndependentInstrumentBounds.interval(filled(a, b, c, d), BINARY, assumptions);
                        if (!complete.isBounded()) {
                            continue;
                        }
                        assertTrue(pending.isBounded(), set + ": a filling is bounded but the pending-aware interval is " + pending.status().id());
                        assertTrue(pending.lower() <= complete.lower() + 1e-7 && complete.upper() <= pending.upper() + 1e-7,
                                set + ": filling " + a + b + c + d + " gives " + complete + " outside " + pending);
                        lowest = Math.min(lowest, complete.lower());
                        highest = Math.max(highest, complete.upper());
                        completeCaseMisses |= !completeCase.isBounded() || complete.lower() < completeCase.lower() - 1e-7
                                || complete.upper() > completeCase.upper() + 1e-7;
                    }
                }
            }
        }
        System.out.printf("%s: pending-aware %s, fillings reach [%.6f, %.6f], complete case %s%n", set, pending, lowest, highest, completeCase);
        // Fillings are whole units: one unit of the smallest arm (13 units) moves its mean by 1/13,
        // so an end inside the box is reached to within that.
        assertEquals(lowest, pending.lower(), 1.0 / 12, set + ": lower end not reached by any filling");
        assertEquals(highest, pending.upper(), 1.0 / 12, set + ": upper end not reached by any filling");
        assertTrue(completeCaseMisses, set + ": the complete-case interval held every filling, so this check could not fail");
    }
}
