package dev.bracket.bounds;

import net.jqwik.api.Arbitraries;
import net.jqwik.api.Assume;
import net.jqwik.api.Arbitrary;
import net.jqwik.api.Combinators;
import net.jqwik.api.Example;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import net.jqwik.api.Provide;

import java.util.EnumSet;
import java.util.Set;
import java.util.stream.Collectors;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;

/**
 * Reflecting the outcome, {@code Y' = a + b - Y}, turns every statement about Y into one about Y'
 * with the order reversed, and the ATE into its negative: ATE' = -ATE. So the interval computed
 * with "lower is better" on Y must be the negated, end-swapped interval computed with "higher is
 * better" on Y' (both arms' means reflected), under the corresponding assumptions:
 *
 * <ul>
 *   <li>{@code worst-case} stays {@code worst-case};</li>
 *   <li>{@code mtr-positive} (Y1 &ge; Y0) becomes {@code mtr-negative} (Y1' &le; Y0') and back;</li>
 *   <li>{@code mts-positive} becomes {@code mts-negative} and back (the order of the conditional
 *       means flips);</li>
 *   <li>{@code optimizing-selection} and {@code sorting-on-gains} keep their names: they are stated
 *       relative to the better end, and "better" flips together with the order (lower Y is higher Y').</li>
 * </ul>
 *
 * The same holds starting from "higher is better" on Y. Status (identified, refuted) must agree.
 */
class DirectionMirrorProperties {

    static Assumption reflected(Assumption a) {
        return switch (a) {
            case MTR_POSITIVE -> Assumption.MTR_NEGATIVE;
            case MTR_NEGATIVE -> Assumption.MTR_POSITIVE;
            case MTS_POSITIVE -> Assumption.MTS_NEGATIVE;
            case MTS_NEGATIVE -> Assumption.MTS_POSITIVE;
            case WORST_CASE, OPTIMIZING_SELECTION, SORTING_ON_GAINS -> a;
        };
    }

    static AssumptionSet reflected(Set<Assumption> set) {
        return AssumptionSet.of(set.stream().map(DirectionMirrorProperties::reflected).collect(Collectors.toSet()));
    }

    static Direction opposite(Direction d) {
        return d == Direction.HIGHER ? Direction.LOWER : Direction.HIGHER;
    }

    record Case(double a, double b, double p, double mu1, double mu0) {
    }

    @Provide
    Arbitrary<Case> cases() {
        Arbitrary<Double> a = Arbitraries.doubles().between(-50, 50).ofScale(9);
        Arbitrary<Double> width = Arbitraries.doubles().between(0.01, 100).ofScale(9);
        Arbitrary<Double> unit = Arbitraries.doubles().between(0, 1).ofScale(9);
        Arbitrary<Double> share = Arbitraries.doubles().between(0.001, 0.999).ofScale(9);
        // One time in four the arms share a mean, to exercise refutation boundaries.
        Arbitrary<Boolean> tie = Arbitraries.integers().between(0, 3).map(i -> i == 0);
        return Combinators.combine(a, width, share, unit, unit, tie)
                .as((lo, w, p, u1, u0, same) -> new Case(lo, lo + w, p, lo + u1 * w, same ? lo + u1 * w : lo + u0 * w));
    }

    @Provide
    Arbitrary<Set<Assumption>> assumptionSets() {
        return Arbitraries.of(Assumption.class).set().ofMinSize(1).ofMaxSize(4).map(s -> EnumSet.copyOf(s));
    }

    @Property(tries = 1000)
    void resultsOnTheReflectedOutcomeAreNegatedUnderTheMirroredAssumptions(
            @ForAll("cases") Case c, @ForAll("assumptionSets") Set<Assumption> set, @ForAll Direction better) {
        // Means that cross by about the rounding slack sit on the refutation threshold itself,
        // where reflecting (a + b - mu) may move them across it; the mirror holds away from it.
        double slack = 1e-9 * (Math.abs(c.a()) + Math.abs(c.b()));
        double gap = Math.abs(c.mu1() - c.mu0());
        Assume.that(gap == 0 || gap < 0.5 * slack || gap > 2 * slack);
        IdentifiedInterval original = BoundCalculator.interval(c.p(), c.mu1(), c.mu0(),
                new OutcomeRange(c.a(), c.b(), better), AssumptionSet.of(set));
        IdentifiedInterval mirrored = BoundCalculator.interval(c.p(), c.a() + c.b() - c.mu1(), c.a() + c.b() - c.mu0(),
                new OutcomeRange(c.a(), c.b(), opposite(better)), reflected(set));

        String where = set + " " + better + " " + c;
        assertEquals(original.status(), mirrored.status(), where);
        if (original.isBounded()) {
            double tolerance = 1e-12 * (Math.abs(c.a()) + Math.abs(c.b()));
            assertEquals(original.lower(), -mirrored.upper(), tolerance, where);
            assertEquals(original.upper(), -mirrored.lower(), tolerance, where);
        }
    }

    @Example
    void keepingTheNameOfMonotoneResponseWouldBreakTheMirror() {
        // Shows the mapping above matters: mtr-positive on Y is not mtr-positive on Y'.
        Case c = new Case(0, 1, 0.4, 0.7, 0.2);
        IdentifiedInterval original = BoundCalculator.interval(c.p(), c.mu1(), c.mu0(),
                new OutcomeRange(0, 1, Direction.LOWER), AssumptionSet.parse("mtr-positive"));
        IdentifiedInterval sameName = BoundCalculator.interval(c.p(), 1 - c.mu1(), 1 - c.mu0(),
                new OutcomeRange(0, 1, Direction.HIGHER), AssumptionSet.parse("mtr-positive"));
        // Under MTR+ the interval is [0, worst-case upper] = [0, 0.76] (Manski 1997) on either
        // outcome, so negating the same-named result gives [-0.76, 0], not [0, 0.76].
        assertEquals(0.0, original.lower(), 0.0);
        assertEquals(0.76, original.upper(), 1e-12);
        assertNotEquals(original.upper(), -sameName.lower(), 1e-6);
    }
}
