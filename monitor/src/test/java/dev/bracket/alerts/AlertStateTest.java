package dev.bracket.alerts;

import dev.bracket.bands.BandMethod;
import dev.bracket.bounds.IdentifiedInterval;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;

import static org.assertj.core.api.Assertions.assertThat;

@DisplayName("The per-key alert state machine")
class AlertStateTest {

    private static final AlertKey KEY = new AlertKey("rollout", "mts-negative", "cumulative", AlertRule.SIGN_IDENTIFIED);
    private static final Evidence EVIDENCE = new Evidence.OfBand(Snapshots.arms(100, 0.6, 100, 0.4),
            IdentifiedInterval.of(0.2, 0.6), Snapshots.band(BandMethod.ANYTIME, 0.05, 0.7), Map.of());
    private static final Verdict POSITIVE = Verdict.met("positive", "band lies above 0");
    private static final Verdict NEGATIVE = Verdict.met("negative", "band lies below 0");
    private static final Verdict CONTAINS_ZERO = Verdict.unmet("band contains 0");

    /** Feeds verdicts one minute apart and collects every transition. */
    private static List<AlertTransition> run(AlertState start, int clearAfter, Verdict... verdicts) {
        AlertState s = start;
        List<AlertTransition> out = new ArrayList<>();
        Instant at = Snapshots.T0;
        for (Verdict v : verdicts) {
            AlertState.Step step = s.next(v, EVIDENCE, at, clearAfter, "meaning");
            s = step.state();
            out.addAll(step.transitions());
            at = at.plus(Duration.ofMinutes(1));
        }
        return out;
    }

    @Test
    @DisplayName("fires once on the first met verdict and stays silent while the condition holds")
    void firesOnce() {
        List<AlertTransition> ts = run(AlertState.initial(KEY), 3, POSITIVE, POSITIVE, POSITIVE, POSITIVE);
        assertThat(ts).hasSize(1);
        assertThat(ts.get(0).kind()).isEqualTo(TransitionKind.FIRING);
        assertThat(ts.get(0).variant()).isEqualTo("positive");
        assertThat(ts.get(0).sequence()).isEqualTo(1);
        assertThat(ts.get(0).summary()).startsWith("sign of the effect identified: positive");
    }

    @Test
    @DisplayName("resolves once after clear-after consecutive unmet verdicts")
    void resolvesAfterConsecutiveUnmet() {
        List<AlertTransition> ts = run(AlertState.initial(KEY), 3,
                POSITIVE, CONTAINS_ZERO, CONTAINS_ZERO, CONTAINS_ZERO, CONTAINS_ZERO, CONTAINS_ZERO);
        assertThat(ts).extracting(AlertTransition::kind).containsExactly(TransitionKind.FIRING, TransitionKind.RESOLVED);
        AlertTransition resolved = ts.get(1);
        assertThat(resolved.at()).isEqualTo(Snapshots.T0.plus(Duration.ofMinutes(3)));
        assertThat(resolved.firingSince()).isEqualTo(Snapshots.T0);
        assertThat(resolved.summary()).contains("no longer identified").contains("for 3 consecutive evaluations");
    }

    @Test
    @DisplayName("a band hovering at zero does not flap: a met verdict resets the count")
    void hysteresisAgainstFlapping() {
        List<AlertTransition> ts = run(AlertState.initial(KEY), 3,
                POSITIVE, CONTAINS_ZERO, POSITIVE, CONTAINS_ZERO, CONTAINS_ZERO, POSITIVE, CONTAINS_ZERO, POSITIVE);
        assertThat(ts).extracting(AlertTransition::kind).containsExactly(TransitionKind.FIRING);
    }

    @Test
    @DisplayName("a clear verdict (condition gone by the margin) resolves at once")
    void clearResolvesAtOnce() {
        List<AlertTransition> ts = run(AlertState.initial(KEY), 3, POSITIVE, Verdict.clear("contains 0 by the margin"));
        assertThat(ts).extracting(AlertTransition::kind).containsExactly(TransitionKind.FIRING, TransitionKind.RESOLVED);
    }

    @Test
    @DisplayName("unknown verdicts change nothing, neither firing nor counting toward resolution")
    void unknownChangesNothing() {
        Verdict unknown = Verdict.unknown("too few units");
        assertThat(run(AlertState.initial(KEY), 3, unknown, unknown)).isEmpty();
        List<AlertTransition> ts = run(AlertState.initial(KEY), 2, POSITIVE, CONTAINS_ZERO, unknown, unknown, POSITIVE, CONTAINS_ZERO);
        assertThat(ts).hasSize(1);
    }

    @Test
    @DisplayName("a sign that flips between two looks resolves the old claim and fires the new one")
    void flipResolvesAndFires() {
        List<AlertTransition> ts = run(AlertState.initial(KEY), 3, POSITIVE, NEGATIVE);
        assertThat(ts).extracting(AlertTransition::kind)
                .containsExactly(TransitionKind.FIRING, TransitionKind.RESOLVED, TransitionKind.FIRING);
        assertThat(ts).extracting(AlertTransition::variant).containsExactly("positive", "positive", "negative");
        assertThat(ts).extracting(AlertTransition::sequence).containsExactly(1L, 2L, 3L);
    }

    @Test
    @DisplayName("transitions are immutable steps: the old state is untouched, ids are unique and deterministic")
    void immutableAndIdentified() {
        AlertState quiet = AlertState.initial(KEY);
        AlertState.Step fired = quiet.next(POSITIVE, EVIDENCE, Snapshots.T0, 1, "m");
        assertThat(quiet.firing()).isFalse();
        assertThat(quiet.sequence()).isZero();
        assertThat(fired.state().firing()).isTrue();

        AlertState.Step again = quiet.next(POSITIVE, EVIDENCE, Snapshots.T0, 1, "m");
        assertThat(again.transitions().get(0).transitionId()).isEqualTo(fired.transitions().get(0).transitionId());

        List<AlertTransition> ts = run(quiet, 1, POSITIVE, CONTAINS_ZERO, POSITIVE, CONTAINS_ZERO);
        assertThat(ts).extracting(AlertTransition::transitionId).doesNotHaveDuplicates().hasSize(4);
        assertThat(ts).extracting(AlertTransition::origin).containsOnly(Snapshots.T0);
    }

    @Test
    @DisplayName("the state a recorded transition leaves behind continues the sequence without re-firing")
    void stateAfterRecordedTransition() {
        AlertTransition fired = run(AlertState.initial(KEY), 3, POSITIVE).get(0);
        AlertState restored = AlertState.after(fired);
        assertThat(restored.firing()).isTrue();
        assertThat(restored.next(POSITIVE, EVIDENCE, Snapshots.T0.plusSeconds(600), 3, "m").transitions()).isEmpty();
        List<AlertTransition> later = run(restored, 1, CONTAINS_ZERO);
        assertThat(later).singleElement().satisfies(t -> {
            assertThat(t.sequence()).isEqualTo(2);
            assertThat(t.firingSince()).isEqualTo(fired.at());
            assertThat(t.transitionId()).isNotEqualTo(fired.transitionId());
        });
    }
}
