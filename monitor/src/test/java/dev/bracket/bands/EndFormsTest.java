package dev.bracket.bands;

import dev.bracket.bounds.Assumption;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.BoundCalculator;
import dev.bracket.bounds.Direction;
import dev.bracket.bounds.IdentifiedInterval;
import dev.bracket.bounds.OutcomeRange;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.Arguments;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.ArrayList;
import java.util.EnumSet;
import java.util.List;
import java.util.Optional;
import java.util.SplittableRandom;
import java.util.stream.Stream;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The anytime band's separate-ends route rests on two readings of {@link BoundCalculator}'s ends
 * (Manski 1990; Manski 1997; Manski &amp; Pepper 2000): an end's form {@code E[q] + c1 mu1 + c0 mu0}
 * ({@link EndQuantities#form}) and whether it moves with the treated share ({@link EndRoute}).
 * Both are checked here against the calculator itself at seeded random points, for every single
 * assumption and every pair, in both outcome directions.
 */
class EndFormsTest {

    private static final int POINTS = 400;

    static Stream<Arguments> setsAndRanges() {
        List<Assumption> identifying = new ArrayList<>(EnumSet.allOf(Assumption.class));
        identifying.remove(Assumption.MISSING_AT_RANDOM);
        List<Arguments> out = new ArrayList<>();
        for (Direction better : Direction.values()) {
            OutcomeRange range = new OutcomeRange(-2, 3, better);
            for (int i = 0; i < identifying.size(); i++) {
                out.add(Arguments.of(AssumptionSet.of(identifying.get(i)), range));
                for (int j = i + 1; j < identifying.size(); j++) {
                    out.add(Arguments.of(AssumptionSet.of(identifying.get(i), identifying.get(j)), range));
                }
            }
        }
        return out.stream();
    }

    @ParameterizedTest(name = "{0}, {1}")
    @MethodSource("setsAndRanges")
    void formsAndShareDependenceAgreeWithTheCalculator(AssumptionSet assumptions, OutcomeRange range) {
        SplittableRandom rng = new SplittableRandom(2000L + assumptions.hashCode() % 1000 + range.better().ordinal());
        for (boolean upper : new boolean[] {false, true}) {
            Optional<EndQuantities.Form> form = EndQuantities.form(range, assumptions, upper);
            EndRoute route = EndRoute.of(range, assumptions, upper, true, true);
            for (int k = 0; k < POINTS; k++) {
                double p = rng.nextDouble();
                double mu1 = range.min() + range.width() * rng.nextDouble();
                double mu0 = range.min() + range.width() * rng.nextDouble();
                IdentifiedInterval at = BoundCalculator.interval(p, mu1, mu0, range, assumptions);
                if (!at.isBounded()) {
                    continue;
                }
                double end = upper ? at.upper() : at.lower();
                if (form.isPresent()) {
                    assertEquals(end, form.get().at(p, mu1, mu0), 1e-12,
                            () -> "form of the " + (upper ? "upper" : "lower") + " end at p, mu1, mu0 = " + p + ", " + mu1 + ", " + mu0);
                }
                if (!route.movesWithShare()) {
                    IdentifiedInterval other = BoundCalculator.interval(1 - p, mu1, mu0, range, assumptions);
                    assertEquals(end, upper ? other.upper() : other.lower(), 1e-12, "end does not move with p");
                }
            }
        }
    }

    @Test
    void monotoneSelectionAndSortingOnGainsHaveFormsWithArmMeans() {
        OutcomeRange range = new OutcomeRange(0, 1);
        EndQuantities.Form mtsUpper = EndQuantities.form(range, AssumptionSet.parse("mts-positive"), true).orElseThrow();
        assertEquals(1, mtsUpper.treatedMean());
        assertEquals(-1, mtsUpper.controlMean());
        assertTrue(mtsUpper.quantityIsZero(), "mts-positive's upper end is mu1 - mu0");
        assertFalse(EndRoute.of(range, AssumptionSet.parse("mts-positive"), true, true, true).movesWithShare());
        EndQuantities.Form sortingLower = EndQuantities.form(range, AssumptionSet.parse("sorting-on-gains"), false).orElseThrow();
        assertEquals(-1, sortingLower.controlMean());
        assertFalse(sortingLower.quantityIsZero(), "sorting on gains' lower end is E[T Y + (1 - T) a] - mu0");
        assertTrue(EndRoute.of(range, AssumptionSet.parse("sorting-on-gains"), false, true, true).movesWithShare());
    }
}
