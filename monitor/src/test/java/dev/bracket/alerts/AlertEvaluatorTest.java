package dev.bracket.alerts;

import dev.bracket.bands.BandMethod;
import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.BoundCalculator;
import dev.bracket.bounds.BoundStatus;
import dev.bracket.bounds.IdentifiedInterval;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeRange;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Nested;
import org.junit.jupiter.api.Test;

import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneOffset;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.Random;

import static org.assertj.core.api.Assertions.assertThat;

@DisplayName("Alert evaluator")
class AlertEvaluatorTest {

    private static final ObservedArms UP = Snapshots.arms(100, 0.6, 100, 0.4);
    private static final ObservedArms DOWN = Snapshots.arms(100, 0.4, 100, 0.6);

    private static StudyAlertConfig config(long minPerArm, int clearAfter, RowRule... rules) {
        return new StudyAlertConfig(minPerArm, BandMethod.ANYTIME, clearAfter, List.of(rules),
                Optional.empty(), Optional.empty(), List.of());
    }

    private static AlertEvaluator evaluator(StudyAlertConfig config) {
        return new AlertEvaluator(Map.of("rollout", config), Clock.fixed(Snapshots.T0, ZoneOffset.UTC));
    }

    /** Evaluates snapshots one minute apart and collects every transition. */
    private static List<AlertTransition> feed(AlertEvaluator e, String assumptions, ObservedArms arms, double[][] bands) {
        List<AlertTransition> out = new ArrayList<>();
        Instant at = Snapshots.T0;
        for (double[] b : bands) {
            out.addAll(e.evaluate(Snapshots.of("rollout", assumptions, arms, b[0], b[1], at)));
            at = at.plusSeconds(60);
        }
        return out;
    }

    private static double[][] bands(double... ends) {
        double[][] out = new double[ends.length / 2][];
        for (int i = 0; i < out.length; i++) {
            out[i] = new double[] {ends[2 * i], ends[2 * i + 1]};
        }
        return out;
    }

    @Nested
    @DisplayName("sign identified")
    class Sign {

        @Test
        @DisplayName("fires positive when band and interval lie above 0, holds, resolves after 3 looks containing 0")
        void positiveLifecycle() {
            // mts-negative with p = 1/2, mu1 = 0.6, mu0 = 0.4 on [0, 1]: m10 >= mu1 and m01 <= mu0 give
            // ATE in [mu1 - mu0, p*mu1 + (1-p)(1 - mu0)] = [0.2, 0.6] (Manski & Pepper 2000, MTS bounds).
            AlertEvaluator e = evaluator(config(30, 3, new SignIdentifiedRule(0)));
            List<AlertTransition> ts = feed(e, "mts-negative", UP,
                    bands(0.05, 0.75, 0.06, 0.74, -0.01, 0.76, -0.02, 0.77, -0.02, 0.77, -0.03, 0.78));
            assertThat(ts).extracting(AlertTransition::kind).containsExactly(TransitionKind.FIRING, TransitionKind.RESOLVED);
            assertThat(ts.get(0).variant()).isEqualTo("positive");
            assertThat(ts.get(0).key().toString()).isEqualTo("rollout/mts-negative/cumulative/sign-identified");
            assertThat(ts.get(0).meaning()).isEqualTo(AssumptionSet.parse("mts-negative").meaning());
            assertThat(ts.get(1).at()).isEqualTo(Snapshots.T0.plusSeconds(4 * 60));
        }

        @Test
        @DisplayName("fires negative when band and interval lie below 0")
        void negative() {
            // mts-positive with mu1 = 0.4 < mu0 = 0.6: upper end mu1 - mu0 = -0.2 (Manski & Pepper 2000).
            AlertEvaluator e = evaluator(config(30, 3, new SignIdentifiedRule(0)));
            List<AlertTransition> ts = feed(e, "mts-positive", DOWN, bands(-0.7, -0.05));
            assertThat(ts).singleElement().satisfies(t -> assertThat(t.variant()).isEqualTo("negative"));
        }

        @Test
        @DisplayName("resolves at once when the band contains 0 by clear-zero-margin")
        void clearZeroMargin() {
            AlertEvaluator e = evaluator(config(30, 3, new SignIdentifiedRule(0.02)));
            List<AlertTransition> ts = feed(e, "mts-negative", UP, bands(0.05, 0.75, -0.01, 0.75, -0.03, 0.75));
            assertThat(ts).extracting(AlertTransition::kind).containsExactly(TransitionKind.FIRING, TransitionKind.RESOLVED);
            assertThat(ts.get(1).at()).isEqualTo(Snapshots.T0.plusSeconds(120));
        }

        @Test
        @DisplayName("a band hovering at zero fires once and does not flap")
        void noFlapping() {
            AlertEvaluator e = evaluator(config(30, 3, new SignIdentifiedRule(0)));
            List<AlertTransition> ts = feed(e, "mts-negative", UP,
                    bands(0.001, 0.7, -0.001, 0.7, 0.001, 0.7, -0.001, 0.7, -0.001, 0.7, 0.002, 0.7, -0.001, 0.7));
            assertThat(ts).extracting(AlertTransition::kind).containsExactly(TransitionKind.FIRING);
        }

        @Test
        @DisplayName("mtr-positive alone never identifies a positive sign: its lower end is exactly 0")
        void mtrLowerEndIsZero() {
            // MTR+ on [0, 1]: lower end = p*(mu1 - mu1) + (1-p)*(mu0 - mu0) = 0 (Manski 1997).
            AlertEvaluator e = evaluator(config(30, 3, new SignIdentifiedRule(0)));
            assertThat(feed(e, "mtr-positive", UP, bands(0.01, 0.7))).isEmpty();
        }
    }

    @Nested
    @DisplayName("minimum sample per arm")
    class MinSample {

        @Test
        @DisplayName("nothing fires while either arm is below min-per-arm, then fires once it is reached")
        void waitsForMinimum() {
            AlertEvaluator e = evaluator(config(50, 3, new SignIdentifiedRule(0)));
            assertThat(e.evaluate(Snapshots.of("rollout", "mts-negative", Snapshots.arms(49, 0.6, 500, 0.4), 0.1, 0.7, Snapshots.T0)))
                    .isEmpty();
            assertThat(e.evaluate(Snapshots.of("rollout", "mts-negative", Snapshots.arms(500, 0.6, 49, 0.4), 0.1, 0.7, Snapshots.T0)))
                    .isEmpty();
            assertThat(e.evaluate(Snapshots.of("rollout", "mts-negative", Snapshots.arms(50, 0.6, 50, 0.4), 0.1, 0.7, Snapshots.T0)))
                    .hasSize(1);
        }

        @Test
        @DisplayName("a dip below the minimum neither resolves nor counts toward clear-after")
        void dipChangesNothing() {
            AlertEvaluator e = evaluator(config(50, 2, new SignIdentifiedRule(0)));
            e.evaluate(Snapshots.of("rollout", "mts-negative", UP, 0.1, 0.7, Snapshots.T0));
            ObservedArms few = Snapshots.arms(10, 0.6, 10, 0.4);
            assertThat(e.evaluate(Snapshots.of("rollout", "mts-negative", few, -0.5, 0.9, Snapshots.T0))).isEmpty();
            assertThat(e.evaluate(Snapshots.of("rollout", "mts-negative", few, -0.5, 0.9, Snapshots.T0))).isEmpty();
            assertThat(e.evaluate(Snapshots.of("rollout", "mts-negative", UP, -0.01, 0.7, Snapshots.T0))).isEmpty();
            assertThat(e.evaluate(Snapshots.of("rollout", "mts-negative", UP, -0.01, 0.7, Snapshots.T0)))
                    .extracting(AlertTransition::kind).containsExactly(TransitionKind.RESOLVED);
        }
    }

    @Test
    @DisplayName("worst case never fires sign-identified, whatever the band says")
    void worstCaseNeverFires() {
        // Manski (1990): with outcomes in [a, b] and no assumption the interval is
        // [p(mu1 - b) + (1-p)(a - mu0), p(mu1 - a) + (1-p)(b - mu0)], of width b - a, and it always
        // contains 0. Checked here on 2,000 random cells with random bands, some of them (wrongly)
        // excluding zero: the rule also requires the estimated interval to exclude 0.
        Random random = new Random(20260301);
        OutcomeRange range = new OutcomeRange(-2, 3);
        AlertEvaluator e = new AlertEvaluator(Map.of("rollout", config(30, 1, new SignIdentifiedRule(0))),
                Clock.fixed(Snapshots.T0, ZoneOffset.UTC));
        int bandsExcludingZero = 0;
        for (int i = 0; i < 2000; i++) {
            ObservedArms arms = new ObservedArms(
                    ArmStatistics.ofSummary(30 + random.nextInt(5000), -2 + 5 * random.nextDouble(), random.nextDouble()),
                    ArmStatistics.ofSummary(30 + random.nextInt(5000), -2 + 5 * random.nextDouble(), random.nextDouble()));
            AssumptionSet worst = AssumptionSet.parse("worst-case");
            IdentifiedInterval iv = BoundCalculator.interval(arms, range, worst);
            assertThat(iv.lower()).isLessThanOrEqualTo(0);
            assertThat(iv.upper()).isGreaterThanOrEqualTo(0);
            assertThat(iv.width()).isCloseTo(range.width(), org.assertj.core.data.Offset.offset(1e-9));
            double lo = -3 + 6 * random.nextDouble();
            double hi = lo + 3 * random.nextDouble();
            bandsExcludingZero += lo > 0 || hi < 0 ? 1 : 0;
            BoundSnapshot s = new BoundSnapshot("rollout", worst, "cumulative", Snapshots.T0, arms, iv,
                    List.of(Snapshots.band(BandMethod.ANYTIME, lo, hi)));
            assertThat(e.evaluate(s)).isEmpty();
        }
        assertThat(bandsExcludingZero).as("the check must include bands that exclude zero").isGreaterThan(500);
        assertThat(e.firing()).isEmpty();
    }

    @Nested
    @DisplayName("interval narrow and practical equivalence")
    class Narrow {

        @Test
        @DisplayName("interval-narrow fires below the width, holds, resolves when wider by clear-extra-width")
        void narrow() {
            AlertEvaluator e = evaluator(config(30, 3, new IntervalNarrowRule(0.5, 0.05)));
            List<AlertTransition> ts = feed(e, "mts-negative", UP, bands(0.1, 0.65, 0.12, 0.61, 0.12, 0.62, 0.10, 0.62, 0.1, 0.66));
            assertThat(ts).extracting(AlertTransition::kind).containsExactly(TransitionKind.FIRING, TransitionKind.RESOLVED);
            assertThat(ts.get(0).at()).isEqualTo(Snapshots.T0.plusSeconds(60));
            assertThat(ts.get(1).at()).isEqualTo(Snapshots.T0.plusSeconds(240));
            assertThat(((Evidence.OfBand) ts.get(0).evidence()).limits()).containsEntry("width", 0.5);
        }

        @Test
        @DisplayName("practical-equivalence fires only when interval and band both lie inside the range")
        void equivalence() {
            // mtr-positive,mts-positive on [0, 1] gives [0, mu1 - mu0] (Manski & Pepper 2000): [0, 0.02] here.
            ObservedArms close = Snapshots.arms(5000, 0.51, 5000, 0.49);
            AlertEvaluator e = evaluator(config(30, 1, new PracticalEquivalenceRule(-0.05, 0.05, 0)));
            List<AlertTransition> ts = feed(e, "mtr-positive,mts-positive", close,
                    bands(-0.06, 0.04, -0.04, 0.04, -0.04, 0.06));
            assertThat(ts).extracting(AlertTransition::kind).containsExactly(TransitionKind.FIRING, TransitionKind.RESOLVED);
            assertThat(ts.get(0).at()).isEqualTo(Snapshots.T0.plusSeconds(60));
            // The same band inside the range but the worst-case interval (width 1) is not: no alert.
            AlertEvaluator w = evaluator(config(30, 1, new PracticalEquivalenceRule(-0.05, 0.05, 0)));
            assertThat(feed(w, "worst-case", close, bands(-0.04, 0.04))).isEmpty();
        }
    }

    @Nested
    @DisplayName("assumptions refuted")
    class Refuted {

        @Test
        @DisplayName("fires when the lower end's band lies above the upper end's band, resolves once upright")
        void invertedBand() {
            // mtr-positive with mts-positive needs mu1 >= mu0 (interval [0, mu1 - mu0], Manski & Pepper 2000);
            // with mu1 = 0.4 < mu0 = 0.6 the calculator reports it refuted.
            AlertEvaluator e = evaluator(config(30, 2, new AssumptionsRefutedRule(0)));
            List<AlertTransition> ts = feed(e, "mtr-positive,mts-positive", DOWN,
                    bands(0.05, -0.1, 0.05, -0.12, -0.01, 0.02, -0.01, 0.02));
            assertThat(ts).extracting(AlertTransition::kind).containsExactly(TransitionKind.FIRING, TransitionKind.RESOLVED);
            assertThat(((Evidence.OfBand) ts.get(0).evidence()).interval().status()).isEqualTo(BoundStatus.REFUTED);
        }

        @Test
        @DisplayName("a refuted estimate whose bands still overlap (sampling error) does not fire")
        void estimateAloneDoesNotFire() {
            AlertEvaluator e = evaluator(config(30, 2, new AssumptionsRefutedRule(0)));
            assertThat(feed(e, "mtr-positive,mts-positive", DOWN, bands(-0.05, 0.03))).isEmpty();
        }

        @Test
        @DisplayName("an inverted band identifies no sign")
        void invertedBandHasNoSign() {
            AlertEvaluator e = evaluator(config(30, 2, new SignIdentifiedRule(0)));
            assertThat(feed(e, "mtr-positive,mts-positive", DOWN, bands(0.05, 0.01))).isEmpty();
        }
    }

    @Nested
    @DisplayName("per-study rules on a clock")
    class OnClock {

        private final MutableClock clock = new MutableClock(Snapshots.T0);

        private AlertEvaluator evaluator(Optional<StreamStalledRule> stalled, Optional<DataQualityRule> quality) {
            StudyAlertConfig c = new StudyAlertConfig(30, BandMethod.ANYTIME, 2, List.of(), stalled, quality, List.of());
            return new AlertEvaluator(Map.of("rollout", c), clock);
        }

        @Test
        @DisplayName("stream-stalled fires once after the silence limit and resolves when an event arrives")
        void stalled() {
            AlertEvaluator e = evaluator(Optional.of(new StreamStalledRule(Duration.ofMinutes(5))), Optional.empty());
            e.recordEvents("rollout", 10, 0, 0);
            clock.advance(Duration.ofMinutes(5));
            assertThat(e.tick()).as("exactly at the limit").isEmpty();
            clock.advance(Duration.ofSeconds(1));
            List<AlertTransition> fired = e.tick();
            assertThat(fired).singleElement().satisfies(t -> {
                assertThat(t.key().toString()).isEqualTo("rollout/*/*/stream-stalled");
                assertThat(((Evidence.OfSilence) t.evidence()).silentFor()).isEqualTo(Duration.ofSeconds(301));
            });
            clock.advance(Duration.ofMinutes(10));
            assertThat(e.tick()).isEmpty();
            e.recordEvents("rollout", 0, 1, 0);
            assertThat(e.tick()).extracting(AlertTransition::kind).containsExactly(TransitionKind.RESOLVED);
        }

        @Test
        @DisplayName("a study that never sends counts as silent from the monitor's start")
        void neverSent() {
            AlertEvaluator e = evaluator(Optional.of(new StreamStalledRule(Duration.ofMinutes(1))), Optional.empty());
            clock.advance(Duration.ofMinutes(2));
            assertThat(e.tick()).hasSize(1);
        }

        @Test
        @DisplayName("data-quality fires above the rejected share, needs min-events, resolves after clear-after ticks")
        void quality() {
            AlertEvaluator e = evaluator(Optional.empty(),
                    Optional.of(new DataQualityRule(0.05, Duration.ofMinutes(10), 100, 0)));
            e.recordEvents("rollout", 40, 10, 4);
            assertThat(e.tick()).as("50 events < min-events 100").isEmpty();
            clock.advance(Duration.ofMinutes(1));
            e.recordEvents("rollout", 50, 0, 0);
            List<AlertTransition> fired = e.tick();
            assertThat(fired).singleElement().satisfies(t -> {
                Evidence.OfQuality q = (Evidence.OfQuality) t.evidence();
                assertThat(q.rejected()).isEqualTo(10);
                assertThat(q.outOfRange()).isEqualTo(4);
                assertThat(q.rejectedShare()).isEqualTo(0.1);
            });
            assertThat(e.tick()).as("still firing: no second transition").isEmpty();
            // Ten minutes on, the bad minute has left the period; 200 clean events remain.
            clock.advance(Duration.ofMinutes(9).plusSeconds(31));
            e.recordEvents("rollout", 200, 0, 0);
            assertThat(e.tick()).isEmpty();
            assertThat(e.tick()).extracting(AlertTransition::kind).containsExactly(TransitionKind.RESOLVED);
        }
    }

    @Test
    @DisplayName("the fixed-horizon band is read when the study selects it")
    void fixedHorizonSelectable() {
        StudyAlertConfig c = new StudyAlertConfig(30, BandMethod.FIXED_HORIZON, 3, List.of(new SignIdentifiedRule(0)),
                Optional.empty(), Optional.empty(), List.of());
        AlertEvaluator e = new AlertEvaluator(Map.of("rollout", c), Clock.fixed(Snapshots.T0, ZoneOffset.UTC));
        AssumptionSet set = AssumptionSet.parse("mts-negative");
        IdentifiedInterval iv = BoundCalculator.interval(UP, Snapshots.UNIT, set);
        BoundSnapshot anytimeOnly = Snapshots.of("rollout", "mts-negative", UP, 0.1, 0.7, Snapshots.T0);
        assertThat(e.evaluate(anytimeOnly)).as("no fixed-horizon band, nothing judged").isEmpty();
        BoundSnapshot both = new BoundSnapshot("rollout", set, "cumulative", Snapshots.T0, UP, iv, List.of(
                Snapshots.band(BandMethod.ANYTIME, -0.1, 0.8), Snapshots.band(BandMethod.FIXED_HORIZON, 0.1, 0.7)));
        assertThat(e.evaluate(both)).singleElement().satisfies(t ->
                assertThat(((Evidence.OfBand) t.evidence()).band().method()).isEqualTo(BandMethod.FIXED_HORIZON));
    }
}
