package dev.bracket.bands;

import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.BoundCalculator;
import dev.bracket.bounds.IdentifiedInterval;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeRange;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

import java.util.Locale;
import java.util.SplittableRandom;

import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The anytime band narrows toward the identified set as data accrue: its excess width over the
 * identified interval shrinks roughly as sqrt(log log n / n) (Howard et al. 2021, Ann. Statist.
 * 49(2), §3), while the identified set itself does not shrink; and it is much narrower than the
 * range-based band it replaced ({@link AnytimeWidthComparison}).
 */
class AnytimeWidthTest {

    /**
     * Targets of the change, on the same simulated data: at least 35% less excess width for
     * outcomes spread over the range at n = 10^3, 10^4, 10^5, at least 70% less for concentrated
     * outcomes at n = 10^4, 10^5; for every set of {@link AnytimeWidthComparison#SETS} but
     * optimizing selection, whose case follows.
     */
    @ParameterizedTest(name = "{0}")
    @ValueSource(strings = {"worst-case", "mtr-positive", "mtr-negative", "mts-positive", "mts-negative",
            "mtr-positive,mts-positive", "sorting-on-gains", "optimizing-selection"})
    @DisplayName("excess width at least 35% below the range-based band for spread outcomes, 70% for concentrated ones")
    void muchNarrowerThanTheRangeBasedBand(String set) {
        AssumptionSet assumptions = AssumptionSet.parse(set);
        double[][] spread = AnytimeWidthComparison.excess(AnytimeWidthComparison.SPREAD, assumptions);
        double[][] concentrated = AnytimeWidthComparison.excess(AnytimeWidthComparison.CONCENTRATED, assumptions);
        for (int i = 0; i < AnytimeWidthComparison.SIZES.length; i++) {
            long n = AnytimeWidthComparison.SIZES[i];
            System.out.printf(Locale.ROOT, "%-26s n=%6d excess before/after: spread %.4f / %.4f, concentrated %.4f / %.4f%n",
                    set, n, spread[i][0], spread[i][1], concentrated[i][0], concentrated[i][1]);
            assertTrue(spread[i][1] <= 0.65 * spread[i][0], "spread outcomes at n = " + n);
            if (n >= 10_000 && !set.equals("optimizing-selection")) {
                assertTrue(concentrated[i][1] <= 0.30 * concentrated[i][0], "concentrated outcomes at n = " + n);
            }
        }
    }

    /**
     * Optimizing selection's ends, {@code E[T (Y - a)]} and {@code E[(1 - T)(a - Y)]}, vary with
     * the treatment indicator however concentrated the outcomes are (sd about 0.28 and 0.21 of
     * the range here), so no variance adaptation takes them to 70% less: the replaced band's own
     * boundary given each end's true spread ({@link AnytimeWidthComparison#knownSpread}) reaches
     * only about 60%. The band stays within 15% of that ideal, and the ideal itself stays short
     * of the 70% target (if the scenario changed so that it did not, this test says so).
     */
    @Test
    void optimizingSelectionWithConcentratedOutcomesIsNearWhatKnowingTheSpreadGives() {
        AssumptionSet assumptions = AssumptionSet.parse("optimizing-selection");
        double[][] concentrated = AnytimeWidthComparison.excess(AnytimeWidthComparison.CONCENTRATED, assumptions);
        double[] ideal = AnytimeWidthComparison.knownSpread(AnytimeWidthComparison.CONCENTRATED, assumptions);
        for (int i = 1; i < AnytimeWidthComparison.SIZES.length; i++) {
            long n = AnytimeWidthComparison.SIZES[i];
            System.out.printf(Locale.ROOT, "optimizing-selection n=%6d concentrated excess before %.4f, after %.4f, known spread %.4f%n",
                    n, concentrated[i][0], concentrated[i][1], ideal[i]);
            assertTrue(concentrated[i][1] <= 1.15 * ideal[i], "band within 15% of the known-spread ideal at n = " + n);
            assertTrue(ideal[i] > 0.30 * concentrated[i][0], "the ideal itself misses 70% less at n = " + n);
        }
    }

    private static final OutcomeRange UNIT = new OutcomeRange(0, 1);

    @ParameterizedTest(name = "{0}")
    @ValueSource(strings = {"worst-case", "mtr-positive,mts-positive", "optimizing-selection"})
    @DisplayName("excess width shrinks at every tenfold increase of n from 100 to 100,000")
    void shrinksTowardTheIdentifiedSet(String set) {
        AssumptionSet assumptions = AssumptionSet.parse(set);
        IdentifiedInterval truth = BoundCalculator.interval(0.3, 0.6, 0.45, UNIT, assumptions);
        AnytimeBand anytime = new AnytimeBand(0.95);
        SplittableRandom rng = new SplittableRandom(49_2021L);
        long n1 = 0;
        long n0 = 0;
        double sum1 = 0;
        double sum0 = 0;
        double previousExcess = Double.POSITIVE_INFINITY;
        double excessAtThousand = Double.NaN;
        for (long n = 1; n <= 100_000; n++) {
            if (rng.nextDouble() < 0.3) {
                n1++;
                sum1 += rng.nextDouble() < 0.6 ? 1 : 0;
            } else {
                n0++;
                sum0 += rng.nextDouble() < 0.45 ? 1 : 0;
            }
            if (n == 100 || n == 1_000 || n == 10_000 || n == 100_000) {
                ObservedArms arms = new ObservedArms(arm(n1, sum1), arm(n0, sum0));
                ConfidenceBand band = anytime.ofCell(arms, UNIT, assumptions);
                ConfidenceBand fixed = FixedHorizonBand.ofCell(arms, UNIT, assumptions, 0.95, VarianceBasis.SAMPLE);
                double excess = band.width() - truth.width();
                System.out.printf(Locale.ROOT, "%-26s n=%6d identified width %.4f, anytime band [%.4f, %.4f] width %.4f (excess %.4f),"
                                + " fixed-horizon width %.4f%n",
                        set, n, truth.width(), band.lower(), band.upper(), band.width(), excess, fixed.width());
                assertTrue(band.lower() <= truth.lower() && band.upper() >= truth.upper(), "band must hold the identified set");
                assertTrue(excess < previousExcess, "excess width must shrink, at n = " + n);
                previousExcess = excess;
                if (n == 1_000) {
                    excessAtThousand = excess;
                }
            }
        }
        // 100 times the data: sqrt(100) = 10 less noise, minus the slowly growing log factor; require at least 5.
        assertTrue(previousExcess < excessAtThousand / 5, "excess at 100,000 should be far below that at 1,000");
    }

    private static ArmStatistics arm(long n, double sum) {
        double mean = sum / n;
        return new ArmStatistics(n, mean, n * mean * (1 - mean), Double.NaN, Double.NaN);
    }
}
