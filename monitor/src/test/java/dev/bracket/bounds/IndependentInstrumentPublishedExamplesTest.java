package dev.bracket.bounds;

import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.util.LinkedHashMap;
import java.util.Map;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Sharp bounds under an independent instrument ({@link IndependentInstrumentBounds}) on published
 * studies with a binary outcome, binary treatment received T and an instrument Z, against the
 * bounds their authors published.
 */
class IndependentInstrumentPublishedExamplesTest {

    private static final OutcomeRange BINARY = new OutcomeRange(0, 1, Direction.HIGHER, OutcomeKind.BINARY);
    private static final AssumptionSet INDEPENDENT = AssumptionSet.parse("worst-case").withInstrument(InstrumentAssumption.INDEPENDENT);

    /** A level's arms from counts of (T, Y): treated with Y=0, treated with Y=1, untreated with Y=0, untreated with Y=1. */
    static ObservedArms level(int treatedZero, int treatedOne, int untreatedZero, int untreatedOne) {
        // One Welford update per unit, as a stream would build the arms.
        return new ObservedArms(InstrumentBoundsPublishedExamplesTest.binary(treatedZero, treatedOne),
                InstrumentBoundsPublishedExamplesTest.binary(untreatedZero, untreatedOne));
    }

    @Test
    @DisplayName("vitamin A supplementation (Sommer et al.): ACE in [-0.1946228, 0.005393689] as published")
    void vitaminA() {
        // Balke & Pearl (1997), JASA 92(439), Table 1: Sommer et al.'s vitamin A trial, Y = 1 survived.
        // Counts and bounds as reproduced in the vignette of Palmer, Ramsahai, Didelez & Sheehan's
        // bpbounds (Stata Journal 11(3), 2011), confirmed by search, not from memory:
        //   z=0: T=0 died 74, survived 11514; nobody treated.  z=1: T=0 34 / 2385, T=1 12 / 9663.
        //   ACE in [-0.1946228, 0.005393689]; instrumental inequality holds.
        Map<String, ObservedArms> levels = new LinkedHashMap<>();
        levels.put("0", level(0, 0, 74, 11514));
        levels.put("1", level(12, 9663, 34, 2385));

        IdentifiedInterval ace = IndependentInstrumentBounds.interval(levels, BINARY, INDEPENDENT);

        assertTrue(ace.isBounded(), ace.status().id());
        assertEquals(-0.1946228, ace.lower(), 5e-8);
        assertEquals(0.005393689, ace.upper(), 5e-10);
    }

    @Test
    @DisplayName("homocysteine and cardiovascular disease (Meleady et al. 2003), three genotype levels: ACE in [-0.09, 0.74]")
    void mendelianRandomizationThreeLevels() {
        // Meleady et al. (2003), Am. J. Clin. Nutr. 77(1): MTHFR 677CT genotype (3 levels) as the
        // instrument, high homocysteine as treatment, cardiovascular disease as outcome. Conditional
        // probabilities P(T, Y | Z) and the bounds [-0.09, 0.74] as given in the bpbounds vignette
        // (Palmer et al. 2011), confirmed by search. Their probability vector
        // (.83 .05 .11 .01 | .88 .06 .05 .01 | .72 .05 .20 .03) per level is read here as
        // (T0Y0, T0Y1, T1Y0, T1Y1), the reading under which their published bounds (and their
        // P(Y | do(T=0)) in [0.06, 0.12], P(Y | do(T=1)) in [0.03, 0.80]) follow; 100 units per level.
        Map<String, ObservedArms> levels = new LinkedHashMap<>();
        levels.put("CC", level(11, 1, 83, 5));
        levels.put("CT", level(5, 1, 88, 6));
        levels.put("TT", level(20, 3, 72, 5));

        IdentifiedInterval ace = IndependentInstrumentBounds.interval(levels, BINARY, INDEPENDENT);

        assertTrue(ace.isBounded(), ace.status().id());
        assertEquals(-0.09, ace.lower(), 1e-9);
        assertEquals(0.74, ace.upper(), 1e-9);
    }

    @Test
    @DisplayName("cholestyramine trial (Lipid Research Clinics): ACE in [0.39, 0.78] as published")
    void cholestyramine() {
        // Pearl, Causality (2nd ed., 2009), section 8.2.4, and Balke & Pearl (1997): P(y, x | z) of the
        // Lipid Research Clinics Coronary Primary Prevention Trial, Y = 1 cholesterol reduction
        // (values recalled from memory), 1000 units per level:
        //   z0: (x0,y0) 0.919, (x0,y1) 0.081, nobody treated
        //   z1: (x0,y0) 0.315, (x0,y1) 0.073, (x1,y0) 0.139, (x1,y1) 0.473
        // Published bounds 0.39 <= ACE <= 0.78 (recalled from memory).
        Map<String, ObservedArms> levels = new LinkedHashMap<>();
        levels.put("z0", level(0, 0, 919, 81));
        levels.put("z1", level(139, 473, 315, 73));

        IdentifiedInterval ace = IndependentInstrumentBounds.interval(levels, BINARY, INDEPENDENT);

        assertTrue(ace.isBounded(), ace.status().id());
        assertEquals(0.39, ace.lower(), 0.005);
        assertEquals(0.78, ace.upper(), 0.005);
    }
}
