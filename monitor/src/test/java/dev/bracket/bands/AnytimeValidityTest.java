package dev.bracket.bands;

import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.BoundCalculator;
import dev.bracket.bounds.IdentifiedInterval;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeRange;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.util.List;
import java.util.Locale;
import java.util.SplittableRandom;
import java.util.stream.IntStream;

import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Time-uniform validity by simulation with known truth (the claim of Howard et al. 2021, Ann.
 * Statist. 49(2), Def. 1: P(exists t: truth outside the band at t) &lt;= alpha). Many streams are
 * looked at after every observation; the share of streams whose anytime band ever misses the
 * true identified set must stay at most alpha (plus three Monte-Carlo standard errors), while the
 * share for the fixed-horizon band looked at in the same way must exceed alpha — which is why the
 * anytime band exists.
 */
class AnytimeValidityTest {

    private static final OutcomeRange UNIT = new OutcomeRange(0, 1);
    private static final double LEVEL = 0.95;
    private static final double ALPHA = 1 - LEVEL;
    private static final int STREAMS = 500;
    private static final int LENGTH = 10_000;
    private static final double P = 0.3;
    private static final double MU1 = 0.6;
    private static final double MU0 = 0.45;

    /** worst case: both ends noisy; MTR+MTS: lower end exact, refutable; optimizing selection: ends scale with p. */
    private static final List<AssumptionSet> SETS = List.of(
            AssumptionSet.parse("worst-case"),
            AssumptionSet.parse("mtr-positive,mts-positive"),
            AssumptionSet.parse("optimizing-selection"));

    @Test
    @DisplayName("the anytime band misses the truth in at most alpha of streams however often it is looked at; the fixed band does not")
    void everMissesAtMostAlpha() {
        AnytimeBand anytime = new AnytimeBand(LEVEL);
        IdentifiedInterval[] truth = SETS.stream()
                .map(s -> BoundCalculator.interval(P, MU1, MU0, UNIT, s)).toArray(IdentifiedInterval[]::new);
        // Each stream has its own seeded generator, so the result does not depend on thread scheduling.
        boolean[][] misses = IntStream.range(0, STREAMS).parallel()
                .mapToObj(i -> stream(new SplittableRandom(2021_0049L * 1000 + i), anytime, truth))
                .toArray(boolean[][]::new);
        double mcError = Math.sqrt(ALPHA * (1 - ALPHA) / STREAMS);
        for (int s = 0; s < SETS.size(); s++) {
            int anytimeMisses = 0;
            int fixedMisses = 0;
            for (boolean[] m : misses) {
                anytimeMisses += m[2 * s] ? 1 : 0;
                fixedMisses += m[2 * s + 1] ? 1 : 0;
            }
            double anytimeShare = (double) anytimeMisses / STREAMS;
            double fixedShare = (double) fixedMisses / STREAMS;
            System.out.printf(Locale.ROOT, "%-26s streams ever missing the identified set over %d looks: anytime %.3f, fixed-horizon %.3f%n",
                    SETS.get(s), LENGTH, anytimeShare, fixedShare);
            assertTrue(anytimeShare <= ALPHA + 3 * mcError, SETS.get(s) + ": anytime band missed in " + anytimeShare);
            assertTrue(fixedShare > ALPHA + 3 * mcError, SETS.get(s) + ": repeated fixed-horizon looks missed only in " + fixedShare);
        }
    }

    @Test
    @DisplayName("one sequence on fair coin flips, where the range-based variance proxy is exact, misses in at most alpha of streams")
    void singleSequenceIsValidWhereItsBoundIsTight() {
        // Bernoulli(1/2) has variance exactly 1/4, the proxy of Hoeffding's lemma, so the normal-mixture
        // boundary (Howard et al. 2021, §3) is nearly tight here and a scaling error would show.
        NormalMixtureBoundary boundary = NormalMixtureBoundary.tunedFor(ALPHA, AnytimeBand.DEFAULT_PLANNED_COUNT);
        int ever = 0;
        SplittableRandom rng = new SplittableRandom(1970_41_05L);
        for (int i = 0; i < STREAMS; i++) {
            long heads = 0;
            for (int t = 1; t <= LENGTH; t++) {
                heads += rng.nextBoolean() ? 1 : 0;
                if (Math.abs((double) heads / t - 0.5) >= boundary.radius(t)) {
                    ever++;
                    break;
                }
            }
        }
        double share = (double) ever / STREAMS;
        System.out.printf(Locale.ROOT, "single sequence at alpha %.2f, fair coin: streams ever missing 0.5 over %d looks: %.3f%n",
                ALPHA, LENGTH, share);
        assertTrue(share <= ALPHA + 3 * Math.sqrt(ALPHA * (1 - ALPHA) / STREAMS), "share " + share);
    }

    /**
     * One stream, looked at after every observation from running counts and sums (count and mean
     * per arm are all either band reads). Returns, per set, {anytime ever missed, fixed ever missed}.
     */
    private static boolean[] stream(SplittableRandom rng, AnytimeBand anytime, IdentifiedInterval[] truth) {
        boolean[] missed = new boolean[2 * SETS.size()];
        long n1 = 0;
        long n0 = 0;
        double sum1 = 0;
        double sum0 = 0;
        for (int t = 1; t <= LENGTH; t++) {
            if (rng.nextDouble() < P) {
                n1++;
                sum1 += rng.nextDouble() < MU1 ? 1 : 0;
            } else {
                n0++;
                sum0 += rng.nextDouble() < MU0 ? 1 : 0;
            }
            if (n1 == 0 || n0 == 0) {
                continue;
            }
            ObservedArms arms = new ObservedArms(arm(n1, sum1), arm(n0, sum0));
            for (int s = 0; s < SETS.size(); s++) {
                if (!missed[2 * s]) {
                    missed[2 * s] = misses(anytime.ofCell(arms, UNIT, SETS.get(s)), truth[s]);
                }
                // Once a fixed-horizon look has missed, the stream counts; later looks need not be computed.
                if (!missed[2 * s + 1] && n1 >= 2 && n0 >= 2) {
                    missed[2 * s + 1] = misses(FixedHorizonBand.ofCell(arms, UNIT, SETS.get(s), LEVEL, VarianceBasis.SAMPLE), truth[s]);
                }
            }
        }
        return missed;
    }

    /** Count and mean suffice for the anytime band; the fixed band also needs a variance, here the binary one. */
    private static ArmStatistics arm(long n, double sum) {
        double mean = sum / n;
        return new ArmStatistics(n, mean, n * mean * (1 - mean), Double.NaN, Double.NaN);
    }

    private static boolean misses(ConfidenceBand band, IdentifiedInterval truth) {
        return !band.isBounded() || band.lower() > truth.lower() || band.upper() < truth.upper();
    }
}
