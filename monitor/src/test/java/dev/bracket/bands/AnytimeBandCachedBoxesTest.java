package dev.bracket.bands;

import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.Direction;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeKind;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.bounds.StudyCells;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;

/**
 * The anytime band keeps the last study's cell boxes for the next assumption set. With pending
 * outcomes the boxes depend on missing-at-random (pending units anywhere in the range, or averaging
 * like the reported ones: Horowitz &amp; Manski 2000, JASA 95(449)), so a band must be the same
 * whichever set was asked for first.
 */
class AnytimeBandCachedBoxesTest {

    private static final OutcomeRange RANGE = new OutcomeRange(-5, 5, Direction.HIGHER, OutcomeKind.BOUNDED);

    @Test
    @DisplayName("with pending outcomes, a band does not depend on whether a missing-at-random band came before it")
    void sameBandWhicheverSetCameFirst() {
        // Two instrument levels take the box route; 100 of 300 treated and 50 of 250 control units pending per level.
        ObservedArms arms = new ObservedArms(new ArmStatistics(200, 1.0, 199 * 4.0, -5, 5).withExposures(300),
                new ArmStatistics(200, 0.2, 199 * 4.0, -5, 5).withExposures(250));
        StudyCells cells = StudyCells.empty().with("all", "z0", arms).with("all", "z1", arms);
        AssumptionSet inRange = AssumptionSet.parse("worst-case");
        AssumptionSet mar = AssumptionSet.parse("missing-at-random");

        ConfidenceBand inRangeAlone = new AnytimeBand(0.95).of(cells, RANGE, inRange);
        ConfidenceBand marAlone = new AnytimeBand(0.95).of(cells, RANGE, mar);
        // The two sets give different boxes here, so sharing boxes between them would show.
        assertNotEquals(inRangeAlone.lower(), marAlone.lower());

        AnytimeBand reused = new AnytimeBand(0.95);
        assertEquals(marAlone.lower(), reused.of(cells, RANGE, mar).lower());
        ConfidenceBand inRangeAfter = reused.of(cells, RANGE, inRange);
        assertEquals(inRangeAlone.lower(), inRangeAfter.lower());
        assertEquals(inRangeAlone.upper(), inRangeAfter.upper());
        ConfidenceBand marAfter = reused.of(cells, RANGE, mar);
        assertEquals(marAlone.lower(), marAfter.lower());
        assertEquals(marAlone.upper(), marAfter.upper());
    }
}
