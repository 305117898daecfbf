package dev.bracket.bounds;

import org.junit.jupiter.api.Test;

import java.util.LinkedHashMap;
import java.util.Map;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** The edges of {@link IndependentInstrumentBounds}: what it refuses, skips and falls back to. */
class IndependentInstrumentLimitsTest {

    private static final OutcomeRange BINARY = new OutcomeRange(0, 1, Direction.HIGHER, OutcomeKind.BINARY);
    private static final AssumptionSet INDEPENDENT = AssumptionSet.parse("worst-case").withInstrument(InstrumentAssumption.INDEPENDENT);

    private static ObservedArms level(int treatedZero, int treatedOne, int untreatedZero, int untreatedOne) {
        return IndependentInstrumentPublishedExamplesTest.level(treatedZero, treatedOne, untreatedZero, untreatedOne);
    }

    @Test
    void aBoundedOutcomeIsRefusedWithAClearMessage() {
        Map<String, ObservedArms> levels = Map.of("a", level(1, 1, 1, 1), "b", level(2, 1, 1, 2));
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> IndependentInstrumentBounds.interval(levels, new OutcomeRange(0, 1), INDEPENDENT));
        assertTrue(e.getMessage().contains("needs a binary outcome"), e.getMessage());
    }

    @Test
    void levelsWithoutUnitsAreSkippedAndOneArmOnlyIsInsufficient() {
        Map<String, ObservedArms> two = new LinkedHashMap<>();
        two.put("a", level(3, 5, 4, 2));
        two.put("b", level(1, 6, 7, 1));
        Map<String, ObservedArms> withEmpty = new LinkedHashMap<>(two);
        withEmpty.put("c", ObservedArms.empty());
        IdentifiedInterval expected = IndependentInstrumentBounds.interval(two, BINARY, INDEPENDENT);
        IdentifiedInterval actual = IndependentInstrumentBounds.interval(withEmpty, BINARY, INDEPENDENT);
        assertTrue(expected.isBounded());
        assertEquals(expected, actual);

        Map<String, ObservedArms> untreated = Map.of("a", level(0, 0, 4, 2), "b", level(0, 0, 7, 1));
        assertEquals(BoundStatus.INSUFFICIENT_DATA, IndependentInstrumentBounds.interval(untreated, BINARY, INDEPENDENT).status());
    }

    @Test
    void beyondTheLevelLimitTheMeanIndependenceBoundsAreReported() {
        Map<String, ObservedArms> levels = new LinkedHashMap<>();
        for (int z = 0; z <= IndependentInstrumentBounds.MAX_LEVELS; z++) {
            levels.put("z" + z, level(2 + z % 3, 5, 4, 1 + z % 2));
        }
        // Independence implies mean independence, so Manski's (1990) bounds stay valid (not sharp).
        assertEquals(InstrumentBounds.interval(levels, BINARY, AssumptionSet.parse("worst-case")),
                IndependentInstrumentBounds.interval(levels, BINARY, INDEPENDENT));
    }
}
