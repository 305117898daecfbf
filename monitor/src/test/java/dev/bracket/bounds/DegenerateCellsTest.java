package dev.bracket.bounds;

import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Cells with no treated or no untreated units yet, or a single unit, must give "insufficient
 * data" or a finite interval: never NaN, never an exception (the README's "insufficient-data"
 * status).
 */
class DegenerateCellsTest {

    private static final OutcomeRange RANGE = new OutcomeRange(-1, 3);

    @Test
    @DisplayName("an empty arm gives insufficient data under every assumption set")
    void emptyArm() {
        ObservedArms noControl = new ObservedArms(ArmStatistics.of(1, 2), ArmStatistics.empty());
        ObservedArms noTreated = new ObservedArms(ArmStatistics.empty(), ArmStatistics.of(0.5));
        for (AssumptionSet set : AssumptionSet.eachSingle()) {
            for (ObservedArms arms : List.of(noControl, noTreated, ObservedArms.empty())) {
                IdentifiedInterval iv = BoundCalculator.interval(arms, RANGE, set);
                assertEquals(BoundStatus.INSUFFICIENT_DATA, iv.status(), set + " " + arms);
                assertFalse(iv.excludesZero());
                assertEquals(0, iv.identifiedSign());
            }
        }
        assertEquals(BoundStatus.INSUFFICIENT_DATA,
                StratifiedBounds.interval(StudyCells.empty(), RANGE, AssumptionSet.parse("worst-case")).overall().status());
        assertEquals(BoundStatus.INSUFFICIENT_DATA,
                StratifiedBounds.interval(StudyCells.single(noControl), RANGE, AssumptionSet.parse("worst-case")).overall().status());
    }

    @Test
    @DisplayName("one unit per arm is enough for an interval; its spread is 0, not NaN")
    void singleUnitPerArm() {
        ArmStatistics one = ArmStatistics.of(2.5);
        assertEquals(0.0, one.variance());
        assertEquals(0.0, one.sd());
        ObservedArms arms = new ObservedArms(ArmStatistics.of(2.5), ArmStatistics.of(-0.5));
        IdentifiedInterval worst = BoundCalculator.interval(arms, RANGE, AssumptionSet.parse("worst-case"));
        // Manski (1990) with p = 1/2, mu1 = 2.5, mu0 = -0.5, [a, b] = [-1, 3]:
        // [0.5*2.5 + 0.5*(-1) - 0.5*(-0.5) - 0.5*3, 0.5*2.5 + 0.5*3 - 0.5*(-0.5) - 0.5*(-1)] = [-0.5, 3.5].
        assertEquals(-0.5, worst.lower(), 1e-12);
        assertEquals(3.5, worst.upper(), 1e-12);
    }

    @Test
    @DisplayName("instrument levels: a level with no units is skipped; no treated units anywhere is insufficient data")
    void instrumentLevels() {
        Map<String, ObservedArms> levels = new LinkedHashMap<>();
        levels.put("empty", ObservedArms.empty());
        levels.put("z", new ObservedArms(ArmStatistics.of(1), ArmStatistics.of(0)));
        InstrumentBounds.Result r = InstrumentBounds.intervalWithLevels(levels, RANGE, AssumptionSet.parse("worst-case"));
        assertTrue(r.overall().isBounded());
        assertEquals(BoundStatus.INSUFFICIENT_DATA, r.perLevel().get("empty").status());
        assertEquals(RANGE.width(), r.overall().width(), 1e-12);

        Map<String, ObservedArms> untreatedOnly = Map.of(
                "z0", new ObservedArms(ArmStatistics.empty(), ArmStatistics.of(1, 2)),
                "z1", new ObservedArms(ArmStatistics.empty(), ArmStatistics.of(0)));
        assertEquals(BoundStatus.INSUFFICIENT_DATA,
                InstrumentBounds.interval(untreatedOnly, RANGE, AssumptionSet.parse("mtr-positive")).status());
    }

    @Test
    @DisplayName("means equal in exact arithmetic but not in floating point do not refute MTR with MTS")
    void roundingDoesNotRefute() {
        // 3 of 12 and 1 of 4 binary outcomes: Welford's means differ in the last bit
        // (0.24999999999999997 vs 0.25). Manski & Pepper (2000): MTR+ with MTS+ gives [0, mu1 - mu0] = [0, 0].
        ArmStatistics treated = ArmStatistics.empty();
        for (int i = 0; i < 12; i++) {
            treated = treated.add(i < 3 ? 1 : 0);
        }
        ArmStatistics control = ArmStatistics.of(1, 0, 0, 0);
        assertTrue(treated.mean() < control.mean(), "the example needs the rounding it guards against");
        IdentifiedInterval iv = BoundCalculator.interval(new ObservedArms(treated, control), new OutcomeRange(0, 1),
                AssumptionSet.parse("mtr-positive,mts-positive"));
        assertTrue(iv.isBounded(), iv.status().id());
        assertEquals(0.0, iv.lower(), 1e-15);
        assertEquals(0.0, iv.upper(), 1e-15);

        // The same tie across instrument levels where nobody is treated: E[Y0] pinned twice at 1/4.
        Map<String, ObservedArms> levels = new LinkedHashMap<>();
        levels.put("z0", new ObservedArms(ArmStatistics.empty(), treated));
        levels.put("z1", new ObservedArms(ArmStatistics.empty(), control));
        levels.put("z2", new ObservedArms(ArmStatistics.of(1, 0), ArmStatistics.of(0, 1)));
        IdentifiedInterval instrument = InstrumentBounds.interval(levels, new OutcomeRange(0, 1), AssumptionSet.parse("worst-case"));
        assertTrue(instrument.isBounded(), instrument.status().id());
    }
}
