package dev.bracket.bounds;

import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.List;
import java.util.SplittableRandom;

import static org.junit.jupiter.api.Assertions.assertTrue;

/** Arms at the edges (one unit, huge counts, means at the range ends) never give NaN or an interval outside [a - b, b - a]. */
class ExtremeCellsPropertyTest {

    /** Seed of the generated cells; with the case number in a failure's name it replays the case. */
    private static final long SEED = 4611686018427387903L;
    private static final List<Extreme> CELLS = SeededCases.generate(SEED, 500, Extreme::random);

    /**
     * A plausible slip at huge counts: the treated share computed from counts narrowed to
     * {@code int}, which wrap around beyond 2^31.
     */
    private static final Engines.FromArms INT_COUNTS = (arms, range, assumptions) -> BoundCalculator.interval(
            (double) (int) arms.treated().count() / (int) arms.total(), arms.treated().mean(), arms.control().mean(),
            range, assumptions);

    /** Both arms with zero spread, and which end of the outcome scale is better. */
    record Extreme(ObservedArms arms, Direction better) {

        /** Counts from 1 to 3 or up to Long.MAX_VALUE / 4, means at or near the range ends of [-1, 3]. */
        static Extreme random(SplittableRandom r) {
            return new Extreme(new ObservedArms(arm(r), arm(r)), SeededCases.oneOf(r, Direction.values()));
        }

        private static ArmStatistics arm(SplittableRandom r) {
            long count = r.nextBoolean() ? r.nextLong(1, 4) : r.nextLong(1, Long.MAX_VALUE / 4);
            double mean = r.nextBoolean() ? SeededCases.oneOf(r, -1.0, 3.0) : r.nextDouble(-1, 3);
            return ArmStatistics.ofSummary(count, mean, 0);
        }
    }

    static List<Extreme> cells() {
        return CELLS;
    }

    @ParameterizedTest(name = "seed " + SEED + ", case {index}: {0}")
    @MethodSource("cells")
    @DisplayName("every single assumption gives a finite interval inside [a - b, b - a]")
    void identifiedIntervalsAreFinite(Extreme cell) {
        finiteAndInRange(cell, Engines.FromArms.REAL);
    }

    @Test
    @DisplayName("the check fails for an engine that narrows the counts to int")
    void failsForAnEngineThatNarrowsCountsToInt() {
        SeededCases.assertRejectsSome(CELLS, c -> finiteAndInRange(c, INT_COUNTS), "counts narrowed to int");
    }

    static void finiteAndInRange(Extreme cell, Engines.FromArms engine) {
        OutcomeRange range = new OutcomeRange(-1, 3, cell.better());
        for (AssumptionSet set : AssumptionSet.eachSingle()) {
            IdentifiedInterval iv = engine.interval(cell.arms(), range, set);
            if (iv.isBounded()) {
                assertTrue(Double.isFinite(iv.lower()) && Double.isFinite(iv.upper()), set + " " + iv);
                // Any ATE of outcomes in [a, b] lies in [a - b, b - a].
                assertTrue(iv.lower() >= -4 - 1e-12 && iv.upper() <= 4 + 1e-12, set + " " + iv);
            }
        }
    }
}
