package dev.bracket.cli;

import com.fasterxml.jackson.databind.JsonNode;
import dev.bracket.alerts.AlertRule;
import dev.bracket.alerts.AlertState;
import dev.bracket.bands.BandMethod;
import dev.bracket.bands.ConfidenceBand;
import dev.bracket.broker.EmbeddedBroker;
import dev.bracket.config.BracketConfig;
import dev.bracket.demo.DemoProducer;
import dev.bracket.demo.RolloutScenario;
import dev.bracket.demo.ScenarioFeed;
import dev.bracket.demo.ScenarioConfig;
import dev.bracket.report.BoundRow;
import dev.bracket.report.store.LatestReports;
import dev.bracket.report.store.PublishedReport;
import dev.bracket.app.Monitor;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import org.apache.kafka.clients.producer.Producer;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Locale;
import java.util.Set;

import static org.assertj.core.api.Assertions.assertThat;
import static org.awaitility.Awaitility.await;

/**
 * The demo's simulated rollout (known truth) through the whole monitor on a real broker: events
 * to Kafka, exactly-once aggregation, the bound updater with anytime bands, the alert evaluator.
 * Sign-identified fires for the assumption sets whose band and interval lie on one side of zero,
 * with that side, and never for worst case.
 */
@DisplayName("Demo scenario end to end: sign-identified alerts")
class DemoAlertsEndToEndTest {

    private static final int EVENTS = 40_000;

    @TempDir
    Path dir;

    @Test
    @DisplayName("fires for the sets that identify the sign, with the band's side, never for worst case")
    void signAlertsFollowTheBands() throws Exception {
        RolloutScenario scenario = new RolloutScenario(ScenarioConfig.defaults(7));
        LatestReports latest = new LatestReports();
        try (EmbeddedBroker broker = EmbeddedBroker.start(dir.resolve("kafka"), 0)) {
            BracketConfig config = BracketConfig.parse("bracket demo", DemoCommand.configYaml())
                    .withBootstrapServers(broker.bootstrapServers());
            try (Monitor monitor = Monitor.start(config, new SimpleMeterRegistry(), latest);
                 Producer<String, String> kafka = DemoProducer.kafkaProducer(broker.bootstrapServers())) {
                DemoProducer sender = new DemoProducer(kafka, DemoCommand.TOPIC, 0, Clock.systemUTC());
                sender.run(new ScenarioFeed(scenario, DemoCommand.STUDY), new DemoProducer.Limits(EVENTS, null), () -> false);
                assertThat(sender.acknowledged()).isEqualTo(EVENTS);
                await().atMost(Duration.ofSeconds(90)).until(() -> latest.get(DemoCommand.STUDY, "cumulative")
                        .map(r -> r.report().pooled().total()).orElse(0L) == EVENTS);
                // The updater hands each report to the alerts right after publishing it; one more
                // publish interval lets the evaluation of the last report finish.
                Thread.sleep(1500);

                PublishedReport last = latest.get(DemoCommand.STUDY, "cumulative").orElseThrow();
                JsonNode view = monitor.alerts().apiView();
                List<String> transitions = new ArrayList<>();
                view.path("recent").forEach(doc -> transitions.add(doc.path("key").asText() + " " + doc.path("state").asText()
                        + " " + doc.path("variant").asText()));
                Set<String> firingSign = new HashSet<>();
                for (AlertState s : monitor.alerts().firing()) {
                    if (s.key().rule() == AlertRule.SIGN_IDENTIFIED && s.key().window().equals("cumulative")) {
                        firingSign.add(s.key().assumptions() + " " + s.variant());
                    }
                }
                System.out.println("demo truth: " + scenario.truth().describe());
                System.out.println("alert transitions: " + transitions);

                int identified = 0;
                for (BoundRow row : last.report().rows()) {
                    ConfidenceBand band = row.bands().stream().filter(b -> b.method() == BandMethod.ANYTIME).findFirst().orElseThrow();
                    int sign = band.sign() != 0 && band.sign() == row.interval().identifiedSign() ? band.sign() : 0;
                    System.out.printf(Locale.ROOT, "%-30s interval %-40s anytime band %s%n", row.assumptions(),
                            row.interval(), band.isBounded() ? "[" + band.lower() + ", " + band.upper() + "]" : band.status().id());
                    if (sign != 0) {
                        identified++;
                        assertThat(firingSign).as("firing for %s", row.assumptions())
                                .contains(row.assumptions() + " " + (sign > 0 ? "positive" : "negative"));
                    }
                }
                assertThat(identified).as("the demo identifies the sign under some assumption set").isPositive();
                assertThat(transitions).as("worst case never fires")
                        .noneMatch(t -> t.startsWith(DemoCommand.STUDY + "/worst-case/"));
                assertThat(firingSign).noneMatch(k -> k.startsWith("worst-case "));
            }
        }
    }
}
