package dev.bracket.bands;

import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.Direction;
import dev.bracket.bounds.IdentifiedInterval;
import dev.bracket.bounds.IndependentInstrumentBounds;
import dev.bracket.bounds.InstrumentAssumption;
import dev.bracket.bounds.ObservablesBox;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeKind;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.bounds.StratifiedBounds;
import dev.bracket.bounds.StudyCells;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Confidence bands around the sharp bounds under an independent instrument (binary outcome):
 * coverage of the true identified set by simulation from a known law of response types, the
 * band holding the estimated interval and lying inside the mean-independence band, and bands
 * from statistics merged across partitions equal to bands from one pass.
 */
class IndependentInstrumentBandsTest {

    private static final OutcomeRange BINARY = new OutcomeRange(0, 1, Direction.HIGHER, OutcomeKind.BINARY);
    private static final double LEVEL = 0.95;

    /**
     * A population: shares of response types {@code takes << 2 | Y0 << 1 | Y1} for two levels
     * (bit z of takes: treated at level z). Compliers (takes only at z1) 40%, always-takers 20%,
     * never-takers 30%, defiers 10%, with outcomes that differ by type (a simulation with known truth).
     */
    private static final double[] TYPES = law();

    private static double[] law() {
        double[] q = new double[16];
        int never = 0;
        int complier = 2;
        int defier = 1;
        int always = 3;
        q[complier << 2 | 0 << 1 | 1] = 0.25; // helped
        q[complier << 2 | 0 << 1 | 0] = 0.10;
        q[complier << 2 | 1 << 1 | 1] = 0.05;
        q[always << 2 | 1 << 1 | 1] = 0.12;
        q[always << 2 | 0 << 1 | 1] = 0.08;
        q[never << 2 | 0 << 1 | 0] = 0.20;
        q[never << 2 | 1 << 1 | 0] = 0.05;
        q[never << 2 | 1 << 1 | 1] = 0.05;
        q[defier << 2 | 0 << 1 | 0] = 0.06;
        q[defier << 2 | 1 << 1 | 1] = 0.04;
        return q;
    }

    private static AssumptionSet independent(String set) {
        return AssumptionSet.parse(set).withInstrument(InstrumentAssumption.INDEPENDENT);
    }

    /** The true (p, mu1, mu0) of each level as a point, and the true sharp bounds from them. */
    private static IdentifiedInterval truth(AssumptionSet set) {
        List<ObservablesBox> points = new ArrayList<>();
        for (int z = 0; z < 2; z++) {
            double p = 0;
            double one1 = 0;
            double one0 = 0;
            for (int t = 0; t < 16; t++) {
                boolean takes = ((t >>> (2 + z)) & 1) == 1;
                if (takes) {
                    p += TYPES[t];
                    one1 += TYPES[t] * (t & 1);
                } else {
                    one0 += TYPES[t] * ((t >>> 1) & 1);
                }
            }
            points.add(new ObservablesBox(p, p, one1 / p, one1 / p, one0 / (1 - p), one0 / (1 - p)));
        }
        return IndependentInstrumentBounds.overBoxes(points, BINARY, set);
    }

    /** One simulated study: n units per level, each drawing its type from the law. */
    private static StudyCells sample(SplittableRandom rng, int n) {
        StudyCells cells = StudyCells.empty();
        for (int z = 0; z < 2; z++) {
            long[] counts = new long[4]; // treated 0/1, untreated 0/1
            for (int i = 0; i < n; i++) {
                double u = rng.nextDouble();
                int t = 0;
                while (t < 15 && u >= TYPES[t]) {
                    u -= TYPES[t];
                    t++;
                }
                boolean takes = ((t >>> (2 + z)) & 1) == 1;
                int y = takes ? t & 1 : (t >>> 1) & 1;
                counts[(takes ? 0 : 2) + y]++;
            }
            cells = cells.with(StudyCells.NONE, "z" + z, new ObservedArms(binary(counts[0], counts[1]), binary(counts[2], counts[3])));
        }
        return cells;
    }

    /** Statistics of a binary arm from its counts: mean = share of ones, M2 = n u (1 - u). */
    private static ArmStatistics binary(long zeros, long ones) {
        long n = zeros + ones;
        if (n == 0) {
            return ArmStatistics.empty();
        }
        double u = (double) ones / n;
        return new ArmStatistics(n, u, n * u * (1 - u), zeros > 0 ? 0 : 1, ones > 0 ? 1 : 0);
    }

    @ParameterizedTest(name = "{0}")
    @ValueSource(strings = {"worst-case", "mtr-positive", "mts-negative"})
    void bothBandsHoldTheTrueIdentifiedSetAtTheNominalLevel(String name) {
        AssumptionSet set = independent(name);
        IdentifiedInterval truth = truth(set);
        assertTrue(truth.isBounded(), "the simulated law satisfies the assumptions");
        SplittableRandom rng = new SplittableRandom(41);
        int reps = 300;
        int fixedHolds = 0;
        int anytimeHolds = 0;
        AnytimeBand anytime = new AnytimeBand(LEVEL);
        for (int r = 0; r < reps; r++) {
            StudyCells cells = sample(rng, 2000);
            ConfidenceBand fixed = FixedHorizonBand.of(cells, BINARY, set, LEVEL, VarianceBasis.SAMPLE);
            ConfidenceBand any = anytime.of(cells, BINARY, set);
            fixedHolds += fixed.contains(truth.lower()) && fixed.contains(truth.upper()) ? 1 : 0;
            anytimeHolds += any.contains(truth.lower()) && any.contains(truth.upper()) ? 1 : 0;
        }
        // Both bands project Bonferroni boxes (conservative by construction), so coverage at or above 95%.
        assertTrue(fixedHolds >= 0.95 * reps, "fixed-horizon band held the identified set in " + fixedHolds + " of " + reps);
        assertTrue(anytimeHolds >= 0.95 * reps, "anytime band held the identified set in " + anytimeHolds + " of " + reps);
    }

    @Test
    void bandsHoldTheEstimateAndLieInsideTheMeanIndependenceBands() {
        SplittableRandom rng = new SplittableRandom(42);
        AnytimeBand anytime = new AnytimeBand(LEVEL);
        int narrower = 0;
        for (int r = 0; r < 60; r++) {
            StudyCells cells = sample(rng, 300 + rng.nextInt(3000));
            for (String name : new String[] {"worst-case", "mtr-positive", "sorting-on-gains"}) {
                AssumptionSet ind = independent(name);
                AssumptionSet mean = AssumptionSet.parse(name);
                IdentifiedInterval estimate = StratifiedBounds.interval(cells, BINARY, ind).overall();
                List<ConfidenceBand> bands = List.of(FixedHorizonBand.of(cells, BINARY, ind, LEVEL, VarianceBasis.SAMPLE),
                        anytime.of(cells, BINARY, ind));
                List<ConfidenceBand> meanBands = List.of(FixedHorizonBand.of(cells, BINARY, mean, LEVEL, VarianceBasis.SAMPLE),
                        anytime.of(cells, BINARY, mean));
                for (int i = 0; i < 2; i++) {
                    ConfidenceBand b = bands.get(i);
                    ConfidenceBand m = meanBands.get(i);
                    String where = name + " " + b.method().id() + " " + cells.byStratum();
                    if (estimate.isBounded()) {
                        assertTrue(b.isBounded() && b.lower() <= estimate.lower() + 1e-9 && b.upper() >= estimate.upper() - 1e-9,
                                "band " + b + " does not hold the estimate " + estimate + ": " + where);
                    }
                    // Independence implies mean independence: no point of the boxes the first allows is lost by the second.
                    if (b.isBounded()) {
                        assertTrue(m.isBounded() && m.lower() <= b.lower() + 1e-9 && m.upper() >= b.upper() - 1e-9,
                                "band " + b + " not inside the mean-independence band " + m + ": " + where);
                        narrower += b.width() < m.width() - 1e-6 ? 1 : 0;
                    }
                }
            }
        }
        assertTrue(narrower > 0, "independence should narrow some band of this two-sided design");
    }

    @Test
    void bandsFromMergedPartitionsEqualBandsFromOnePass() {
        SplittableRandom rng = new SplittableRandom(43);
        StudyCells first = sample(rng, 700);
        StudyCells second = sample(rng, 900);
        StudyCells merged = first;
        for (var levels : second.byStratum().entrySet()) {
            for (var level : levels.getValue().entrySet()) {
                merged = merged.with(levels.getKey(), level.getKey(), level.getValue());
            }
        }
        StudyCells onePass = StudyCells.empty();
        for (String level : new String[] {"z0", "z1"}) {
            ObservedArms a = first.byStratum().get(StudyCells.NONE).get(level);
            ObservedArms b = second.byStratum().get(StudyCells.NONE).get(level);
            long t1 = Math.round(a.treated().sum() + b.treated().sum());
            long t0 = a.treated().count() + b.treated().count() - t1;
            long c1 = Math.round(a.control().sum() + b.control().sum());
            long c0 = a.control().count() + b.control().count() - c1;
            onePass = onePass.with(StudyCells.NONE, level, new ObservedArms(binary(t0, t1), binary(c0, c1)));
        }
        AssumptionSet set = independent("worst-case");
        for (BandMethod method : BandMethod.values()) {
            BandConfig settings = new BandConfig(LEVEL, java.util.EnumSet.of(method), VarianceBasis.SAMPLE, AnytimeBand.DEFAULT_PLANNED_COUNT);
            ConfidenceBand fromMerged = settings.bands(merged, BINARY, set).get(0);
            ConfidenceBand fromOnePass = settings.bands(onePass, BINARY, set).get(0);
            assertEquals(fromOnePass.lower(), fromMerged.lower(), 1e-9, method.id());
            assertEquals(fromOnePass.upper(), fromMerged.upper(), 1e-9, method.id());
        }
    }
}
