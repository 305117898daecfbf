package dev.bracket.alerts.delivery;

import dev.bracket.alerts.AlertEvaluator;
import dev.bracket.alerts.AlertTransition;
import dev.bracket.alerts.AlertsConfig;
import dev.bracket.alerts.MutableClock;
import dev.bracket.alerts.Snapshots;
import dev.bracket.alerts.StreamStalledRule;
import dev.bracket.alerts.StudyAlertConfig;
import dev.bracket.alerts.TransitionKind;
import dev.bracket.report.Cautions;
import com.fasterxml.jackson.databind.JsonNode;
import dev.bracket.bands.BandMethod;
import dev.bracket.bands.BandConfig;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.StudyCells;
import dev.bracket.report.store.PublishedReport;
import dev.bracket.report.StudyReport;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Optional;

import static org.assertj.core.api.Assertions.assertThat;

@DisplayName("Alert service: reports in, sinks and metrics out")
class AlertServiceTest {

    /** A sink that remembers, and one that always throws. */
    private static final class Collecting implements AlertSink {
        final List<AlertTransition> got = new ArrayList<>();

        @Override
        public String name() {
            return "collecting";
        }

        @Override
        public void accept(AlertTransition t) {
            got.add(t);
        }
    }

    private static final class Broken implements AlertSink {
        @Override
        public String name() {
            return "broken";
        }

        @Override
        public void accept(AlertTransition t) {
            throw new IllegalStateException("receiver on fire");
        }
    }

    @Test
    @DisplayName("a published report fires sign-identified for the sets that identify it, never for worst case")
    void reportToSinks() {
        SimpleMeterRegistry registry = new SimpleMeterRegistry();
        Collecting study = new Collecting();
        RecentAlerts recent = new RecentAlerts(10);
        AlertEvaluator evaluator = new AlertEvaluator(Map.of("rollout", StudyAlertConfig.defaults()),
                java.time.Clock.fixed(Snapshots.T0, java.time.ZoneOffset.UTC));
        AlertDispatcher dispatcher = new AlertDispatcher(List.of(new Broken(), recent), Map.of("rollout", List.of(study)), registry);
        AlertsConfig options = new AlertsConfig("bracket-alerts", Duration.ofHours(1), 10, Duration.ofSeconds(5));

        // p = 1/2, mu1 = 0.6, mu0 = 0.4 on [0, 1]: worst case [-0.4, 0.6] (Manski 1990), mts-negative
        // [0.2, 0.6] (Manski & Pepper 2000), mtr-positive [0, 0.6] (Manski 1997). Bands are the
        // bands package's real ones; 5,000 units per arm put mts-negative's anytime band above 0.
        ObservedArms arms = Snapshots.arms(5000, 0.6, 5000, 0.4);
        List<AssumptionSet> sets = List.of(AssumptionSet.parse("worst-case"), AssumptionSet.parse("mts-negative"),
                AssumptionSet.parse("mtr-positive"));
        StudyReport report = StudyReport.of(StudyCells.single(arms), Snapshots.UNIT, sets, BandConfig.both(0.95));
        assertThat(report.rows().get(1).bands()).anySatisfy(b -> {
            assertThat(b.method()).isEqualTo(BandMethod.ANYTIME);
            assertThat(b.lower()).isPositive();
        });
        try (AlertService service = new AlertService(evaluator, dispatcher, recent, options)) {
            service.onReport(new PublishedReport("rollout", "cumulative", Snapshots.T0, report));
            service.onReport(new PublishedReport("rollout", "cumulative", Snapshots.T0.plusSeconds(5), report));

            assertThat(study.got).singleElement().satisfies(t -> {
                assertThat(t.key().toString()).isEqualTo("rollout/mts-negative/cumulative/sign-identified");
                assertThat(t.variant()).isEqualTo("positive");
            });
            assertThat(registry.get("bracket.alerts.fired").tag("rule", "sign-identified").counter().count()).isEqualTo(1);
            assertThat(registry.get("bracket.alerts.sink.failures").tag("sink", "broken").counter().count())
                    .as("a failing sink is counted and does not stop the others").isEqualTo(1);

            JsonNode view = service.apiView();
            assertThat(view.path("schema").asText()).isEqualTo("bracket.alerts/2");
            assertThat(view.path("firing")).hasSize(1);
            assertThat(view.path("firing").get(0).path("key").asText()).isEqualTo("rollout/mts-negative/cumulative/sign-identified");
            assertThat(view.path("recent")).hasSize(1);
            assertThat(view.path("recent").get(0).path("schema").asText()).isEqualTo("bracket.alert/2");
            assertThat(view.path("cautions")).hasSize(Cautions.ALL.size());
        }
    }

    @Test
    @DisplayName("the clock judges per-study rules and counts resolutions per rule")
    void clockRules() {
        SimpleMeterRegistry registry = new SimpleMeterRegistry();
        MutableClock clock = new MutableClock(Snapshots.T0);
        StudyAlertConfig c = new StudyAlertConfig(30, BandMethod.ANYTIME, 1, List.of(),
                Optional.of(new StreamStalledRule(Duration.ofMinutes(1))), Optional.empty(), List.of());
        RecentAlerts recent = new RecentAlerts(10);
        AlertService service = new AlertService(new AlertEvaluator(Map.of("rollout", c), clock),
                new AlertDispatcher(List.of(recent), Map.of(), registry), recent,
                new AlertsConfig("bracket-alerts", Duration.ofHours(1), 10, Duration.ofSeconds(5)));
        clock.advance(Duration.ofMinutes(2));
        service.tick();
        service.recordEvents("rollout", 1, 0, 0);
        service.tick();
        service.close();
        assertThat(recent.newestFirst()).extracting(AlertTransition::kind)
                .containsExactly(TransitionKind.RESOLVED, TransitionKind.FIRING);
        assertThat(registry.get("bracket.alerts.fired").tag("rule", "stream-stalled").counter().count()).isEqualTo(1);
        assertThat(registry.get("bracket.alerts.resolved").tag("rule", "stream-stalled").counter().count()).isEqualTo(1);
    }

    @Test
    @DisplayName("a released study is not judged and drops its state; taken again, its silence counts from the take-over")
    void judgesOwnedStudiesOnly() {
        MutableClock clock = new MutableClock(Snapshots.T0);
        StudyAlertConfig c = new StudyAlertConfig(30, BandMethod.ANYTIME, 1, List.of(),
                Optional.of(new StreamStalledRule(Duration.ofMinutes(1))), Optional.empty(), List.of());
        RecentAlerts recent = new RecentAlerts(10);
        AlertService service = new AlertService(new AlertEvaluator(Map.of("rollout", c, "other", c), clock),
                new AlertDispatcher(List.of(recent), Map.of(), new SimpleMeterRegistry()), recent,
                new AlertsConfig("bracket-alerts", Duration.ofHours(1), 10, Duration.ofSeconds(5)));
        service.release(java.util.Set.of("other"));
        clock.advance(Duration.ofMinutes(2));
        service.tick();
        assertThat(recent.newestFirst()).extracting(t -> t.key().study()).containsExactly("rollout");
        assertThat(service.firing()).extracting(s -> s.key().study()).containsExactly("rollout");
        service.release(java.util.Set.of("rollout"));
        assertThat(service.firing()).as("state of a released study is dropped").isEmpty();
        service.take(java.util.Set.of("other"));
        clock.advance(Duration.ofSeconds(59));
        service.tick();
        assertThat(recent.newestFirst()).as("59 s after the take-over: not yet stalled").hasSize(1);
        clock.advance(Duration.ofSeconds(2));
        service.tick();
        service.close();
        assertThat(recent.newestFirst()).extracting(t -> t.key().study() + " " + t.kind())
                .containsExactly("other " + TransitionKind.FIRING, "rollout " + TransitionKind.FIRING);
    }

    @Test
    @DisplayName("the recent list keeps the newest, up to its capacity")
    void recentIsBounded() {
        RecentAlerts recent = new RecentAlerts(2);
        List<AlertTransition> ts = Transitions.alternating(Transitions.key("rollout", "mts-negative"), 3);
        ts.forEach(recent::accept);
        assertThat(recent.newestFirst()).containsExactly(ts.get(2), ts.get(1));
    }
}
