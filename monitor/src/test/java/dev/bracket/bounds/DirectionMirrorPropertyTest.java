package dev.bracket.bounds;

import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.EnumSet;
import java.util.List;
import java.util.Set;
import java.util.SplittableRandom;
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
class DirectionMirrorPropertyTest {

    /** Seed of the generated cases; with the case number in a failure's name it replays the case. */
    private static final long SEED = 20000701L;
    private static final List<Mirror> CASES = SeededCases.generate(SEED, 1000, Mirror::random);

    /** A plausible slip: the outcome direction dropped on the way in, as if higher were always better. */
    private static final Engines.FromMeans DIRECTION_IGNORED = (p, mu1, mu0, range, assumptions) ->
            BoundCalculator.interval(p, mu1, mu0, new OutcomeRange(range.min(), range.max(), Direction.HIGHER), assumptions);

    static Assumption reflected(Assumption a) {
        return switch (a) {
            case MTR_POSITIVE -> Assumption.MTR_NEGATIVE;
            case MTR_NEGATIVE -> Assumption.MTR_POSITIVE;
            case MTS_POSITIVE -> Assumption.MTS_NEGATIVE;
            case MTS_NEGATIVE -> Assumption.MTS_POSITIVE;
            case WORST_CASE, OPTIMIZING_SELECTION, SORTING_ON_GAINS, MISSING_AT_RANDOM -> a;
        };
    }

    static AssumptionSet reflected(Set<Assumption> set) {
        return AssumptionSet.of(set.stream().map(DirectionMirrorPropertyTest::reflected).collect(Collectors.toSet()));
    }

    static Direction opposite(Direction d) {
        return d == Direction.HIGHER ? Direction.LOWER : Direction.HIGHER;
    }

    record Case(double a, double b, double p, double mu1, double mu0) {

        /**
         * a in [-50, 50), width in [0.01, 100), p in [0.001, 0.999), means anywhere in [a, b] including its ends; one
         * time in four the arms share a mean, to exercise refutation boundaries. Means that cross
         * by about the rounding slack sit on the refutation threshold itself, where reflecting
         * (a + b - mu) may move them across it; the mirror holds away from it, so such draws are
         * drawn again.
         */
        static Case random(SplittableRandom r) {
            while (true) {
                double a = r.nextDouble(-50, 50);
                double w = r.nextDouble(0.01, 100);
                double p = r.nextDouble(0.001, 0.999);
                double mu1 = a + SeededCases.unitWithEnds(r) * w;
                double mu0 = r.nextInt(4) == 0 ? mu1 : a + SeededCases.unitWithEnds(r) * w;
                double slack = new OutcomeRange(a, a + w).roundingSlack();
                double gap = Math.abs(mu1 - mu0);
                if (gap == 0 || gap < 0.5 * slack || gap > 2 * slack) {
                    return new Case(a, a + w, p, mu1, mu0);
                }
            }
        }
    }

    /** A cell, one to four assumptions, and which end of the outcome scale is better. */
    record Mirror(Case cell, Set<Assumption> set, Direction better) {

        static Mirror random(SplittableRandom r) {
            Assumption[] all = Assumption.values();
            Set<Assumption> set = EnumSet.noneOf(Assumption.class);
            int size = 1 + r.nextInt(4);
            while (set.size() < size) {
                set.add(all[r.nextInt(all.length)]);
            }
            return new Mirror(Case.random(r), set, SeededCases.oneOf(r, Direction.values()));
        }
    }

    static List<Mirror> cases() {
        return CASES;
    }

    @ParameterizedTest(name = "seed " + SEED + ", case {index}: {0}")
    @MethodSource("cases")
    @DisplayName("results on the reflected outcome are negated under the mirrored assumptions")
    void resultsOnTheReflectedOutcomeAreNegatedUnderTheMirroredAssumptions(Mirror m) {
        mirrorHolds(m, Engines.FromMeans.REAL);
    }

    @Test
    @DisplayName("the check fails for an engine that ignores which end is better")
    void failsForAnEngineThatIgnoresTheDirection() {
        SeededCases.assertRejectsSome(CASES, m -> mirrorHolds(m, DIRECTION_IGNORED), "direction ignored");
    }

    static void mirrorHolds(Mirror m, Engines.FromMeans engine) {
        Case c = m.cell();
        IdentifiedInterval original = engine.interval(c.p(), c.mu1(), c.mu0(),
                new OutcomeRange(c.a(), c.b(), m.better()), AssumptionSet.of(m.set()));
        IdentifiedInterval mirrored = engine.interval(c.p(), c.a() + c.b() - c.mu1(), c.a() + c.b() - c.mu0(),
                new OutcomeRange(c.a(), c.b(), opposite(m.better())), reflected(m.set()));

        String where = m.toString();
        assertEquals(original.status(), mirrored.status(), where);
        if (original.isBounded()) {
            double tolerance = 1e-12 * (Math.abs(c.a()) + Math.abs(c.b()));
            assertEquals(original.lower(), -mirrored.upper(), tolerance, where);
            assertEquals(original.upper(), -mirrored.lower(), tolerance, where);
        }
    }

    @Test
    @DisplayName("keeping the name of monotone response would break the mirror")
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
