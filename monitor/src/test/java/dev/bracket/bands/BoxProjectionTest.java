package dev.bracket.bands;

import dev.bracket.bounds.Assumption;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.BoundCalculator;
import dev.bracket.bounds.Direction;
import dev.bracket.bounds.IdentifiedInterval;
import dev.bracket.bounds.InstrumentBounds;
import dev.bracket.bounds.ObservablesBox;
import dev.bracket.bounds.OutcomeRange;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.util.EnumSet;
import java.util.Optional;
import java.util.SplittableRandom;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The vertex rule of {@link BoxProjection} against brute force: for random boxes and random
 * assumption sets, the band must hold the identified interval at every sampled point of the box
 * (soundness), must not be wider than the sampled extremes allow (tightness), and must say
 * "refuted" only when no sampled point is compatible with the assumptions. The two-corner shortcut
 * of {@link BoxProjection#cell} (and of the instrument levels' ranges) must give the very same
 * numbers as evaluating every vertex.
 */
class BoxProjectionTest {

    private static final Assumption[] ALL = Assumption.values();

    @Test
    @DisplayName("the hull over box vertices agrees with brute-force search over the box")
    void agreesWithBruteForce() {
        SplittableRandom rng = new SplittableRandom(42);
        int checkedBands = 0;
        int checkedRefutations = 0;
        for (int trial = 0; trial < 400; trial++) {
            OutcomeRange range = new OutcomeRange(-1, 3, rng.nextBoolean() ? Direction.HIGHER : Direction.LOWER);
            AssumptionSet assumptions = randomSet(rng);
            ObservablesBox box = randomBox(rng, range);
            Optional<BoxProjection.Ends> ends = BoxProjection.cell(box, range, assumptions);
            double sampledLow = Double.POSITIVE_INFINITY;
            double sampledHigh = Double.NEGATIVE_INFINITY;
            for (int k = 0; k < 3000; k++) {
                double p = box.pLow() + rng.nextDouble() * (box.pHigh() - box.pLow());
                double mu1 = box.mu1Low() + rng.nextDouble() * (box.mu1High() - box.mu1Low());
                // Every fourth point on the diagonal mu1 = mu0 (when the box reaches it): assumptions such as
                // MTS in both directions are compatible with the data only there.
                double mu0 = k % 4 == 0 && mu1 >= box.mu0Low() && mu1 <= box.mu0High()
                        ? mu1 : box.mu0Low() + rng.nextDouble() * (box.mu0High() - box.mu0Low());
                IdentifiedInterval iv = BoundCalculator.interval(p, mu1, mu0, range, assumptions);
                if (iv.isBounded()) {
                    assertTrue(ends.isPresent(), "refuted, yet " + assumptions + " holds at " + p + ", " + mu1 + ", " + mu0);
                    assertTrue(ends.get().lower() <= iv.lower() + 1e-12 && ends.get().upper() >= iv.upper() - 1e-12,
                            "band " + ends.get() + " misses " + iv + " under " + assumptions);
                    sampledLow = Math.min(sampledLow, iv.lower());
                    sampledHigh = Math.max(sampledHigh, iv.upper());
                }
            }
            if (ends.isPresent() && sampledLow <= sampledHigh) {
                // Random points approach the extremes; allow a margin of 5% of the largest possible width.
                double slack = 0.05 * 2 * range.width();
                assertEquals(sampledLow, ends.get().lower(), slack, "lower end not tight under " + assumptions);
                assertEquals(sampledHigh, ends.get().upper(), slack, "upper end not tight under " + assumptions);
                checkedBands++;
            }
            if (ends.isEmpty()) {
                assertFalse(sampledLow <= sampledHigh);
                checkedRefutations++;
            }
        }
        assertTrue(checkedBands > 100 && checkedRefutations > 10,
                "the random cases must include bands and refutations: " + checkedBands + ", " + checkedRefutations);
    }

    @Test
    @DisplayName("the two-corner shortcut gives exactly the ends that evaluating every vertex gives, for cells and instrument levels")
    void cornersAgreeWithEveryVertex() {
        SplittableRandom rng = new SplittableRandom(16);
        int shortcuts = 0;
        int levelShortcuts = 0;
        for (int trial = 0; trial < 20_000; trial++) {
            OutcomeRange range = new OutcomeRange(-5, 5, rng.nextBoolean() ? Direction.HIGHER : Direction.LOWER);
            AssumptionSet assumptions = randomSet(rng);
            ObservablesBox box = trial % 5 == 0 ? edgeBox(rng, range) : randomBox(rng, range);
            Optional<BoxProjection.Ends> fast = BoxProjection.cell(box, range, assumptions);
            Optional<BoxProjection.Ends> slow = BoxProjection.cellByVertices(box, range, assumptions);
            assertEquals(slow.isPresent(), fast.isPresent(), "refuted under " + assumptions + " for " + box);
            if (slow.isPresent()) {
                assertEquals(slow.get().lower(), fast.get().lower(), 0.0, "lower end under " + assumptions + " for " + box);
                assertEquals(slow.get().upper(), fast.get().upper(), 0.0, "upper end under " + assumptions + " for " + box);
            }
            if (BoundCalculator.interval(box.pLow(), box.mu1Low(), box.mu0High(), range, assumptions).isBounded()
                    && BoundCalculator.interval(box.pLow(), box.mu1High(), box.mu0Low(), range, assumptions).isBounded()) {
                shortcuts++;
            }
            Optional<InstrumentBounds.LevelMeans> fastLevel = BoxProjection.levelRanges(box, range, assumptions);
            Optional<InstrumentBounds.LevelMeans> slowLevel = BoxProjection.levelRangesByVertices(box, range, assumptions);
            assertEquals(slowLevel, fastLevel, "level ranges under " + assumptions + " for " + box);
            if (InstrumentBounds.levelMeans(box.pLow(), box.mu1Low(), box.mu0Low(), range, assumptions).isPresent()
                    && InstrumentBounds.levelMeans(box.pLow(), box.mu1High(), box.mu0High(), range, assumptions).isPresent()) {
                levelShortcuts++;
            }
        }
        // Both routes must be exercised: the shortcut, and the vertex scan after a refuted corner.
        assertTrue(shortcuts > 5_000 && shortcuts < 19_000, "shortcut taken " + shortcuts + " times");
        assertTrue(levelShortcuts > 5_000 && levelShortcuts < 19_000, "level shortcut taken " + levelShortcuts + " times");
    }

    /** A box with ends at the range's ends, at p = 0 or 1, or a single point in some coordinate. */
    private static ObservablesBox edgeBox(SplittableRandom rng, OutcomeRange range) {
        ObservablesBox b = randomBox(rng, range);
        double[] p = rng.nextBoolean() ? new double[] {0, b.pHigh()} : new double[] {b.pLow(), 1};
        double mu1High = rng.nextBoolean() ? range.max() : b.mu1Low();
        double mu0Low = rng.nextBoolean() ? range.min() : b.mu0High();
        return new ObservablesBox(p[0], p[1], b.mu1Low(), mu1High, mu0Low, b.mu0High());
    }

    private static AssumptionSet randomSet(SplittableRandom rng) {
        EnumSet<Assumption> set = EnumSet.noneOf(Assumption.class);
        while (set.isEmpty()) {
            for (Assumption a : ALL) {
                if (rng.nextDouble() < 0.3) {
                    set.add(a);
                }
            }
        }
        return AssumptionSet.of(set);
    }

    private static ObservablesBox randomBox(SplittableRandom rng, OutcomeRange range) {
        double[] p = sorted(rng.nextDouble(), rng.nextDouble());
        double[] m1 = sorted(value(rng, range), value(rng, range));
        double[] m0 = sorted(value(rng, range), value(rng, range));
        return new ObservablesBox(p[0], p[1], m1[0], m1[1], m0[0], m0[1]);
    }

    private static double value(SplittableRandom rng, OutcomeRange range) {
        return range.min() + rng.nextDouble() * range.width();
    }

    private static double[] sorted(double a, double b) {
        return new double[] {Math.min(a, b), Math.max(a, b)};
    }
}
