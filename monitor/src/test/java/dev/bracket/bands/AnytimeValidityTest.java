package dev.bracket.bands;

import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.BoundCalculator;
import dev.bracket.bounds.IdentifiedInterval;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeRange;
import org.apache.commons.math3.random.RandomGenerator;
import org.apache.commons.math3.random.Well19937c;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.Arguments;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.List;
import java.util.Locale;
import java.util.function.Predicate;
import java.util.stream.IntStream;
import java.util.stream.Stream;

import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Time-uniform validity by simulation with known truth (the claim of Howard et al. 2021, Ann.
 * Statist. 49(2), Def. 1: P(exists t: truth outside the band at t) &lt;= alpha). Many streams are
 * looked at after every unit, from the first moment both arms have 30 units, for 10,000 looks;
 * the share of streams whose anytime band ever misses the true identified set must stay at most
 * alpha plus three Monte-Carlo standard errors, for outcomes spread over the range, concentrated,
 * skewed, and rare binary events. The positive control shows why the band exists: the
 * fixed-horizon band looked at in the same way misses far more often.
 */
class AnytimeValidityTest {

    private static final OutcomeRange UNIT = new OutcomeRange(0, 1);
    private static final double LEVEL = 0.95;
    private static final double ALPHA = 1 - LEVEL;
    private static final int STREAMS = 500;
    private static final int LOOKS = 10_000;
    private static final int FIRST_LOOK_PER_ARM = 30;
    private static final double P = 0.3;
    private static final double MC_ERROR = Math.sqrt(ALPHA * (1 - ALPHA) / STREAMS);

    /**
     * Worst case takes one sequence per end; MTR+MTS bounds each end over one-sided boxes and can
     * be refuted; MTS bounds its lower end by a per-unit quantity and its upper end, mu1 - mu0, by
     * one-sided bounds on both arm means; sorting on gains bounds each end by a per-unit quantity
     * and one arm mean (e.g. {@code E[T Y + (1 - T) a] - mu0}).
     */
    private static final List<AssumptionSet> SETS = List.of(
            AssumptionSet.parse("worst-case"),
            AssumptionSet.parse("mtr-positive,mts-positive"),
            AssumptionSet.parse("mts-positive"),
            AssumptionSet.parse("sorting-on-gains"));

    /** Streams for the positive control: its miss rate is far from alpha, so fewer suffice. */
    private static final int CONTROL_STREAMS = 200;

    static Stream<Arguments> laws() {
        return Stream.of(
                Arguments.of("spread", OutcomeLaw.beta(1.2, 0.8), OutcomeLaw.beta(0.9, 1.1)),
                Arguments.of("concentrated (sd 0.05)", OutcomeLaw.beta(59.4, 39.6), OutcomeLaw.beta(44.55, 54.45)),
                Arguments.of("skewed", OutcomeLaw.beta(0.6, 3.4), OutcomeLaw.beta(0.5, 4.5)),
                Arguments.of("rare events", OutcomeLaw.bernoulli(0.02), OutcomeLaw.bernoulli(0.01)));
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("laws")
    @DisplayName("the anytime band misses the identified set in at most alpha of streams over 10,000 looks")
    void everMissesAtMostAlpha(String name, OutcomeLaw treated, OutcomeLaw control) {
        AnytimeBand anytime = new AnytimeBand(LEVEL);
        IdentifiedInterval[] truth = SETS.stream()
                .map(s -> BoundCalculator.interval(P, treated.mean(), control.mean(), UNIT, s)).toArray(IdentifiedInterval[]::new);
        // Each stream has its own seeded generator, so the result does not depend on thread scheduling.
        boolean[][] misses = IntStream.range(0, STREAMS).parallel()
                .mapToObj(i -> stream(new Well19937c(2021_0049L * 1000 + i), treated, control, anytime, truth))
                .toArray(boolean[][]::new);
        for (int s = 0; s < SETS.size(); s++) {
            int ever = 0;
            for (boolean[] m : misses) {
                ever += m[s] ? 1 : 0;
            }
            double share = (double) ever / STREAMS;
            System.out.printf(Locale.ROOT, "%-24s %-26s streams ever missing the identified set over %d looks: %.3f (limit %.3f)%n",
                    name, SETS.get(s), LOOKS, share, ALPHA + 3 * MC_ERROR);
            assertTrue(share <= ALPHA + 3 * MC_ERROR, name + ", " + SETS.get(s) + ": anytime band missed in " + share);
        }
    }

    /** One stream looked at after every unit once both arms have 30; per set, whether the band ever missed. */
    private static boolean[] stream(RandomGenerator rng, OutcomeLaw treated, OutcomeLaw control, AnytimeBand anytime,
                                    IdentifiedInterval[] truth) {
        boolean[] missed = new boolean[SETS.size()];
        look(rng, treated, control, arms -> {
            for (int s = 0; s < SETS.size(); s++) {
                if (!missed[s]) {
                    missed[s] = misses(anytime.ofCell(arms, UNIT, SETS.get(s)), truth[s]);
                }
            }
            return true;
        });
        return missed;
    }

    /**
     * Draws units (treated with probability P) and, once both arms have 30, hands the arms to
     * {@code atLook} after every unit, for {@link #LOOKS} looks or until it returns false.
     */
    private static void look(RandomGenerator rng, OutcomeLaw treated, OutcomeLaw control, Predicate<ObservedArms> atLook) {
        ObservedArms arms = ObservedArms.empty();
        int looks = 0;
        while (looks < LOOKS) {
            boolean isTreated = rng.nextDouble() < P;
            arms = arms.add(isTreated, (isTreated ? treated : control).draw(rng));
            if (arms.treated().count() < FIRST_LOOK_PER_ARM || arms.control().count() < FIRST_LOOK_PER_ARM) {
                continue;
            }
            looks++;
            if (!atLook.test(arms)) {
                return;
            }
        }
    }

    @Test
    @DisplayName("positive control: the fixed-horizon band looked at again and again misses far more often than alpha")
    void repeatedFixedLooksMissMoreOften() {
        // Binary outcomes as in the first version of this check; looks after every unit until the first miss.
        OutcomeLaw treated = OutcomeLaw.bernoulli(0.6);
        OutcomeLaw control = OutcomeLaw.bernoulli(0.45);
        AssumptionSet worstCase = AssumptionSet.parse("worst-case");
        IdentifiedInterval truth = BoundCalculator.interval(P, treated.mean(), control.mean(), UNIT, worstCase);
        long ever = IntStream.range(0, CONTROL_STREAMS).parallel().filter(i -> {
            boolean[] missed = {false};
            look(new Well19937c(2004_0601L + i), treated, control, arms -> {
                missed[0] = misses(FixedHorizonBand.ofCell(arms, UNIT, worstCase, LEVEL, VarianceBasis.SAMPLE), truth);
                return !missed[0];
            });
            return missed[0];
        }).count();
        double share = (double) ever / CONTROL_STREAMS;
        System.out.printf(Locale.ROOT, "worst-case, binary outcomes: streams whose fixed-horizon band ever missed over %d looks: %.3f%n",
                LOOKS, share);
        assertTrue(share > ALPHA + 3 * Math.sqrt(ALPHA * (1 - ALPHA) / CONTROL_STREAMS),
                "repeated fixed-horizon looks missed only in " + share);
    }

    @ParameterizedTest(name = "Bernoulli({0})")
    @MethodSource("coins")
    @DisplayName("one sequence where the bound is nearly tight (fair coin) and on rare events misses in at most alpha of streams")
    void singleSequenceIsValid(double mean) {
        // A fair coin has the largest variance in [0, 1], where Fan et al.'s inequality is nearly an
        // equality at the grid's lambda; rare events test the variance-adaptive side.
        EmpiricalBernsteinBoundary boundary = new EmpiricalBernsteinBoundary(ALPHA, AnytimeBand.DEFAULT_PLANNED_COUNT);
        long ever = IntStream.range(0, STREAMS).parallel().filter(i -> {
            RandomGenerator rng = new Well19937c(1970_41_05L + i);
            ArmStatistics arm = ArmStatistics.empty();
            for (int t = 1; t <= LOOKS; t++) {
                arm = arm.add(rng.nextDouble() < mean ? 1 : 0);
                double r = boundary.radius(arm.count(), arm.m2(), 1, 1 - arm.mean());
                if (arm.mean() + r < mean) {
                    return true;
                }
            }
            return false;
        }).count();
        double share = (double) ever / STREAMS;
        System.out.printf(Locale.ROOT, "single upper bound at alpha %.2f, Bernoulli(%.2f): streams ever below the mean over %d looks: %.3f%n",
                ALPHA, mean, LOOKS, share);
        assertTrue(share <= ALPHA + 3 * MC_ERROR, "share " + share);
    }

    static Stream<Double> coins() {
        return Stream.of(0.5, 0.01);
    }

    private static boolean misses(ConfidenceBand band, IdentifiedInterval truth) {
        return !band.isBounded() || band.lower() > truth.lower() || band.upper() < truth.upper();
    }
}
