package dev.bracket.alerts.delivery;

import dev.bracket.alerts.AlertEvaluator;
import dev.bracket.alerts.AlertKey;
import dev.bracket.alerts.AlertRule;
import dev.bracket.alerts.AlertState;
import dev.bracket.alerts.AlertTransition;
import dev.bracket.alerts.BoundSnapshot;
import dev.bracket.alerts.SignIdentifiedRule;
import dev.bracket.alerts.Snapshots;
import dev.bracket.alerts.StudyAlertConfig;
import dev.bracket.alerts.TransitionKind;
import dev.bracket.bands.BandMethod;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.MockConsumer;
import org.apache.kafka.clients.producer.MockProducer;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.Node;
import org.apache.kafka.common.PartitionInfo;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.serialization.StringSerializer;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.nio.charset.StandardCharsets;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneOffset;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;

import static org.assertj.core.api.Assertions.assertThat;

/**
 * State restore through the alerts topic's records, with Kafka's own MockProducer / MockConsumer:
 * records, keys, headers and the read-to-end loop are real, and odd records can be planted.
 * {@link AlertRestartOnBrokerTest} does the same against a running broker.
 */
@DisplayName("Alert state restore from the alerts topic")
class AlertRestoreTest {

    private static final String TOPIC = "bracket-alerts";
    private static final int PARTITIONS = 3;

    private static AlertEvaluator evaluator() {
        StudyAlertConfig c = new StudyAlertConfig(30, BandMethod.ANYTIME, 3, List.of(new SignIdentifiedRule(0)),
                Optional.empty(), Optional.empty(), List.of());
        return new AlertEvaluator(Map.of("rollout", c), Clock.fixed(Snapshots.T0, ZoneOffset.UTC));
    }

    private static BoundSnapshot positive(int minute) {
        return Snapshots.of("rollout", "mts-negative", Snapshots.arms(100, 0.6, 100, 0.4), 0.05, 0.75,
                Snapshots.T0.plusSeconds(60L * minute));
    }

    private static BoundSnapshot containsZero(int minute) {
        return Snapshots.of("rollout", "mts-negative", Snapshots.arms(100, 0.6, 100, 0.4), -0.01, 0.75,
                Snapshots.T0.plusSeconds(60L * minute));
    }

    /** The records a producer wrote, as a consumer of the topic would read them, partitioned by key hash. */
    private static MockConsumer<String, String> topicWith(List<ProducerRecord<String, String>> written) {
        MockConsumer<String, String> consumer = new MockConsumer<>("earliest");
        List<PartitionInfo> infos = new ArrayList<>();
        Map<TopicPartition, Long> begin = new HashMap<>();
        Map<TopicPartition, Long> end = new HashMap<>();
        for (int p = 0; p < PARTITIONS; p++) {
            infos.add(new PartitionInfo(TOPIC, p, Node.noNode(), new Node[0], new Node[0]));
            begin.put(new TopicPartition(TOPIC, p), 0L);
            end.put(new TopicPartition(TOPIC, p), 0L);
        }
        consumer.updatePartitions(TOPIC, infos);
        consumer.updateBeginningOffsets(begin);
        List<ConsumerRecord<String, String>> records = new ArrayList<>();
        for (ProducerRecord<String, String> r : written) {
            int p = r.key() == null ? 0 : Math.floorMod(r.key().hashCode(), PARTITIONS);
            TopicPartition tp = new TopicPartition(TOPIC, p);
            long offset = end.get(tp);
            end.put(tp, offset + 1);
            records.add(new ConsumerRecord<>(TOPIC, p, offset, r.key(), r.value()));
        }
        consumer.updateEndOffsets(end);
        consumer.schedulePollTask(() -> records.forEach(consumer::addRecord));
        return consumer;
    }

    @Test
    @DisplayName("a restarted evaluator with restored state does not fire again, and resolves once")
    void noRefireAfterRestart() {
        MockProducer<String, String> producer = new MockProducer<>(true, null,
                new StringSerializer(), new StringSerializer());
        KafkaAlertSink sink = new KafkaAlertSink(producer, TOPIC, new SimpleMeterRegistry());

        AlertEvaluator before = evaluator();
        List<AlertTransition> fired = before.evaluate(positive(0));
        fired.forEach(sink::accept);
        before.evaluate(positive(1)).forEach(sink::accept);
        assertThat(fired).hasSize(1);
        assertThat(producer.history()).singleElement().satisfies(r -> {
            assertThat(r.key()).isEqualTo("rollout/mts-negative/cumulative/sign-identified");
            assertThat(new String(r.headers().lastHeader(KafkaAlertSink.TRANSITION_ID_HEADER).value(), StandardCharsets.UTF_8))
                    .isEqualTo(fired.get(0).transitionId());
        });

        List<AlertState> restored = AlertHistory.read(topicWith(producer.history()), TOPIC, Duration.ofSeconds(5), Instant.MAX).states();
        AlertEvaluator after = evaluator();
        after.restore(restored);
        assertThat(after.firing()).extracting(s -> s.key().toString())
                .containsExactly("rollout/mts-negative/cumulative/sign-identified");
        assertThat(after.evaluate(positive(10))).as("already fired before the restart").isEmpty();
        after.evaluate(containsZero(11));
        after.evaluate(containsZero(12));
        List<AlertTransition> resolved = after.evaluate(containsZero(13));
        assertThat(resolved).singleElement().satisfies(t -> {
            assertThat(t.kind()).isEqualTo(TransitionKind.RESOLVED);
            assertThat(t.sequence()).isEqualTo(2);
            assertThat(t.firingSince()).isEqualTo(fired.get(0).at());
            assertThat(t.origin()).isEqualTo(fired.get(0).origin());
        });
        assertThat(after.evaluate(containsZero(14))).isEmpty();

        AlertEvaluator forgetful = evaluator();
        assertThat(forgetful.evaluate(positive(10))).as("without restore the same alert would fire again").hasSize(1);
    }

    @Test
    @DisplayName("the newest transition per key wins; tombstones and foreign records are skipped")
    void newestWinsAndJunkIsSkipped() {
        AlertKey key = Transitions.key("rollout", "mts-negative");
        List<AlertTransition> ts = Transitions.alternating(key, 3);
        List<ProducerRecord<String, String>> written = new ArrayList<>();
        written.add(new ProducerRecord<>(TOPIC, key.toString(), AlertJson.toText(ts.get(0))));
        written.add(new ProducerRecord<>(TOPIC, key.toString(), AlertJson.toText(ts.get(1))));
        written.add(new ProducerRecord<>(TOPIC, "rollout/x/cumulative/sign-identified", null));
        written.add(new ProducerRecord<>(TOPIC, "noise", "{\"schema\":\"something.else/1\"}"));
        written.add(new ProducerRecord<>(TOPIC, "noise", "not json"));
        written.add(new ProducerRecord<>(TOPIC, key.toString(), AlertJson.toText(ts.get(2))));

        List<AlertState> restored = AlertHistory.read(topicWith(written), TOPIC, Duration.ofSeconds(5), Instant.MAX).states();
        assertThat(restored).singleElement().satisfies(s -> {
            assertThat(s.key()).isEqualTo(key);
            assertThat(s.firing()).isTrue();
            assertThat(s.sequence()).isEqualTo(3);
            assertThat(s.variant()).isEqualTo("positive");
        });
    }

    @Test
    @DisplayName("a topic that does not exist yet restores nothing")
    void missingTopic() {
        MockConsumer<String, String> consumer = new MockConsumer<>("earliest");
        assertThat(AlertHistory.read(consumer, TOPIC, Duration.ofMillis(200), Instant.MAX).states()).isEmpty();
    }

    @Test
    @DisplayName("restoring twice, or restoring older state over newer, changes nothing")
    void restoreIsIdempotent() {
        AlertEvaluator e = evaluator();
        List<AlertTransition> ts = Transitions.alternating(Transitions.key("rollout", "mts-negative"), 2);
        e.restore(List.of(AlertState.after(ts.get(1))));
        e.restore(List.of(AlertState.after(ts.get(0))));
        assertThat(e.state(ts.get(0).key()).sequence()).isEqualTo(2);
        assertThat(e.firing()).isEmpty();
    }

    @Test
    @DisplayName("state of a study or rule no longer configured is not taken over")
    void unconfiguredStateIgnored() {
        AlertEvaluator e = evaluator();
        AlertTransition otherStudy = Transitions.alternating(Transitions.key("retired-study", "mts-negative"), 1).get(0);
        AlertTransition otherRule = Transitions.alternating(
                new AlertKey("rollout", "mts-negative", "cumulative", AlertRule.INTERVAL_NARROW), 1).get(0);
        e.restore(List.of(AlertState.after(otherStudy), AlertState.after(otherRule)));
        assertThat(e.firing()).isEmpty();
    }
}
