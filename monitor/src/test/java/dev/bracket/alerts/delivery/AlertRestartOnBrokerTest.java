package dev.bracket.alerts.delivery;

import dev.bracket.alerts.AlertRule;

import dev.bracket.alerts.StreamStalledRule;

import dev.bracket.alerts.AlertsConfig;
import dev.bracket.alerts.BoundSnapshot;
import dev.bracket.alerts.MutableClock;
import dev.bracket.alerts.SignIdentifiedRule;
import dev.bracket.alerts.Snapshots;
import dev.bracket.alerts.StudyAlertConfig;
import dev.bracket.bands.BandMethod;
import dev.bracket.broker.EmbeddedBroker;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.admin.AdminClientConfig;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.serialization.StringDeserializer;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Optional;

import static org.assertj.core.api.Assertions.assertThat;

/**
 * Alert state survives a restart of the monitor and of the broker: the alerts topic on a real
 * single-node Kafka in this JVM is the only state carried over.
 */
@DisplayName("Alert state across restarts, on a real broker")
class AlertRestartOnBrokerTest {

    private static final String TOPIC = "bracket-alerts";
    private static final AlertsConfig OPTIONS = new AlertsConfig(TOPIC, Duration.ofHours(1), 50, Duration.ofSeconds(30));
    private static final Map<String, StudyAlertConfig> STUDIES = Map.of("rollout", new StudyAlertConfig(30,
            BandMethod.ANYTIME, 3, List.of(new SignIdentifiedRule(0)), Optional.empty(), Optional.empty(), List.of()));
    private static final String KEY = "rollout/mts-negative/cumulative/sign-identified";

    @TempDir
    Path dir;

    private static BoundSnapshot snapshot(double bandLower, int minute) {
        return Snapshots.of("rollout", "mts-negative", Snapshots.arms(100, 0.6, 100, 0.4), bandLower, 0.75,
                Snapshots.T0.plusSeconds(60L * minute));
    }

    private static AlertService start(EmbeddedBroker broker) {
        return AlertService.start(STUDIES, OPTIONS, Optional.of(Map.of("bootstrap.servers", broker.bootstrapServers())),
                new SimpleMeterRegistry(), new MutableClock(Snapshots.T0));
    }

    /** Every record of {@code topic}, read to its end. */
    static List<ConsumerRecord<String, String>> records(EmbeddedBroker broker, String topic) {
        try (KafkaConsumer<String, String> c = new KafkaConsumer<>(Map.of(
                ConsumerConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers(),
                ConsumerConfig.ENABLE_AUTO_COMMIT_CONFIG, false), new StringDeserializer(), new StringDeserializer())) {
            List<TopicPartition> tps = c.partitionsFor(topic).stream().map(p -> new TopicPartition(topic, p.partition())).toList();
            c.assign(tps);
            c.seekToBeginning(tps);
            Map<TopicPartition, Long> end = c.endOffsets(tps);
            List<ConsumerRecord<String, String>> out = new ArrayList<>();
            while (tps.stream().anyMatch(tp -> c.position(tp) < end.get(tp))) {
                c.poll(Duration.ofMillis(200)).forEach(out::add);
            }
            return out;
        }
    }

    @Test
    @DisplayName("a restarted monitor does not fire again what fired, resolves it once, and stays resolved")
    void noRefireAcrossRestarts() throws Exception {
        Path data = dir.resolve("kafka");
        EmbeddedBroker broker = EmbeddedBroker.start(data, 0);
        try {
            try (Admin admin = Admin.create(Map.of(AdminClientConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers()))) {
                admin.createTopics(List.of(KafkaAlertSink.topic(TOPIC, 3, (short) 1))).all().get();
            }
            String firedId;
            try (AlertService first = start(broker)) {
                first.onSnapshot(snapshot(0.05, 0));
                first.onSnapshot(snapshot(0.06, 1));
                assertThat(first.apiView().path("recent")).hasSize(1);
                firedId = first.apiView().path("recent").get(0).path("transitionId").asText();
            }
            broker.close();
            broker = EmbeddedBroker.start(data, 0);

            try (AlertService second = start(broker)) {
                assertThat(second.firing()).extracting(s -> s.key().toString()).containsExactly(KEY);
                second.onSnapshot(snapshot(0.07, 10));
                assertThat(second.apiView().path("recent")).as("no second firing after the restart").isEmpty();
                second.onSnapshot(snapshot(-0.01, 11));
                second.onSnapshot(snapshot(-0.01, 12));
                second.onSnapshot(snapshot(-0.01, 13));
                assertThat(second.apiView().path("recent")).singleElement().satisfies(doc -> {
                    assertThat(doc.path("state").asText()).isEqualTo("resolved");
                    assertThat(doc.path("sequence").asLong()).isEqualTo(2);
                    assertThat(doc.path("firingSince").asText()).isEqualTo(Snapshots.T0.toString());
                });
            }

            try (AlertService third = start(broker)) {
                assertThat(third.firing()).isEmpty();
                third.onSnapshot(snapshot(-0.01, 20));
                assertThat(third.apiView().path("recent")).as("a resolved alert is not resolved again").isEmpty();
            }

            List<ConsumerRecord<String, String>> recs = records(broker, TOPIC);
            assertThat(recs).extracting(ConsumerRecord::key).containsOnly(KEY);
            assertThat(recs).hasSize(2);
            assertThat(recs.stream().map(r -> new String(r.headers().lastHeader(KafkaAlertSink.TRANSITION_ID_HEADER).value(),
                    StandardCharsets.UTF_8)).toList()).startsWith(firedId).doesNotHaveDuplicates();
        } finally {
            broker.close();
        }
    }
    private static final Map<String, StudyAlertConfig> STALL_ONLY = Map.of("rollout", new StudyAlertConfig(30,
            BandMethod.ANYTIME, 3, List.of(), Optional.of(new StreamStalledRule(Duration.ofMinutes(1))), Optional.empty(),
            List.of()));

    private static AlertService startStallOnly(EmbeddedBroker broker, MutableClock clock) {
        return AlertService.start(STALL_ONLY, OPTIONS, Optional.of(Map.of("bootstrap.servers", broker.bootstrapServers())),
                new SimpleMeterRegistry(), clock);
    }

    @Test
    @DisplayName("a restart with a stalled stream produces no transition: the stall stays firing until an event arrives")
    void restartWithStalledStreamIsNoNews() throws Exception {
        EmbeddedBroker broker = EmbeddedBroker.start(dir.resolve("kafka-stall"), 0);
        try {
            try (Admin admin = Admin.create(Map.of(AdminClientConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers()))) {
                admin.createTopics(List.of(KafkaAlertSink.topic(TOPIC, 1, (short) 1))).all().get();
            }
            MutableClock clock = new MutableClock(Snapshots.T0);
            try (AlertService first = startStallOnly(broker, clock)) {
                first.recordEvents("rollout", 10, 0, 0);
                clock.advance(Duration.ofSeconds(30));
                first.tick();
                assertThat(first.apiView().path("recent")).as("30 s of silence is within the limit").isEmpty();
                clock.advance(Duration.ofSeconds(31));
                first.tick();
                assertThat(first.apiView().path("recent")).singleElement()
                        .satisfies(doc -> assertThat(doc.path("state").asText()).isEqualTo("firing"));
            }

            clock.advance(Duration.ofMinutes(5));
            try (AlertService second = startStallOnly(broker, clock)) {
                assertThat(second.firing()).extracting(s -> s.key().rule()).containsExactly(AlertRule.STREAM_STALLED);
                for (int i = 0; i < 6; i++) { // the first 2 minutes after the restart, a tick every 20 s
                    second.tick();
                    clock.advance(Duration.ofSeconds(20));
                }
                assertThat(second.apiView().path("recent")).as("no resolve/fire pair for a stall that did not end").isEmpty();
                assertThat(second.firing()).hasSize(1);

                second.recordEvents("rollout", 1, 0, 0);
                second.tick();
                assertThat(second.apiView().path("recent")).as("an event that did arrive is news").singleElement()
                        .satisfies(doc -> {
                            assertThat(doc.path("state").asText()).isEqualTo("resolved");
                            assertThat(doc.path("sequence").asLong()).isEqualTo(2);
                        });
            }

            // Silent again for 40 s, then a restart: the silence is judged from the restored last
            // event (not from the start), and fires once the monitor has run for the limit.
            clock.advance(Duration.ofSeconds(40));
            try (AlertService third = startStallOnly(broker, clock)) {
                third.tick();
                assertThat(third.apiView().path("recent")).isEmpty();
                clock.advance(Duration.ofSeconds(61));
                third.tick();
                assertThat(third.apiView().path("recent")).singleElement().satisfies(doc -> {
                    assertThat(doc.path("state").asText()).isEqualTo("firing");
                    assertThat(doc.path("sequence").asLong()).isEqualTo(3);
                    assertThat(doc.path("evidence").path("silentForSeconds").asDouble())
                            .as("silence counted from the last event before the restart, not from the start").isEqualTo(101.0);
                });
            }
        } finally {
            broker.close();
        }
    }
}
