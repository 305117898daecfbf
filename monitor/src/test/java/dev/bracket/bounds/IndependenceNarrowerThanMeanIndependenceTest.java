package dev.bracket.bounds;

import org.junit.jupiter.api.Test;

import java.util.LinkedHashMap;
import java.util.Map;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * A construction of our own (not published data) where the instrument's independence identifies
 * the sign of the effect and its mean independence does not: two-sided non-compliance with a
 * binary outcome, 1000 units per level, counts (treated Y=0, treated Y=1, untreated Y=0,
 * untreated Y=1) of (50, 400, 550, 0) at z0 and (450, 100, 450, 0) at z1.
 */
class IndependenceNarrowerThanMeanIndependenceTest {

    private static final OutcomeRange BINARY = new OutcomeRange(0, 1, Direction.HIGHER, OutcomeKind.BINARY);

    private static Map<String, ObservedArms> levels() {
        Map<String, ObservedArms> levels = new LinkedHashMap<>();
        levels.put("z0", IndependentInstrumentPublishedExamplesTest.level(50, 400, 550, 0));
        levels.put("z1", IndependentInstrumentPublishedExamplesTest.level(450, 100, 450, 0));
        return levels;
    }

    @Test
    void meanIndependenceContainsZeroWhileIndependenceExcludesIt() {
        AssumptionSet worstCase = AssumptionSet.parse("worst-case");

        IdentifiedInterval mean = InstrumentBounds.interval(levels(), BINARY, worstCase);
        IdentifiedInterval independent = IndependentInstrumentBounds.interval(levels(), BINARY,
                worstCase.withInstrument(InstrumentAssumption.INDEPENDENT));

        // Manski (1990) by hand: E[Y1] in [0.40, 0.95] at z0 and [0.10, 0.55] at z1, so [0.40, 0.55];
        // E[Y0] in [0, 0.45] at z0 and [0, 0.55] at z1, so [0, 0.45]; ATE in [0.40 - 0.45, 0.55 - 0].
        assertEquals(-0.05, mean.lower(), 1e-12);
        assertEquals(0.55, mean.upper(), 1e-12);
        assertFalse(mean.excludesZero());
        // Balke & Pearl (1997) lower bound, term p(y1,x1|z0) - p(y1,x1|z1) - p(y1,x0|z1) - p(y0,x1|z0) - p(y1,x0|z0)
        // = 0.40 - 0.10 - 0 - 0.05 - 0 = 0.25 (Pearl 2009, eq. 8.14, recalled from memory); the upper bound
        // is the mean-independence one, p(y1,x1|z1) + p(y0,x0|z1) = 0.10 + 0.45 = 0.55.
        assertTrue(independent.isBounded());
        assertEquals(0.25, independent.lower(), 1e-9);
        assertEquals(0.55, independent.upper(), 1e-9);
        assertEquals(1, independent.identifiedSign());
    }
}
