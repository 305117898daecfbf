package dev.bracket.stream;

import dev.bracket.stream.transaction.KafkaClients;
import dev.bracket.app.TopicSetup;
import com.fasterxml.jackson.databind.JsonNode;
import dev.bracket.broker.BrokerPerClass;
import dev.bracket.broker.ChildMonitor;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.admin.AdminClientConfig;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.OffsetAndMetadata;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.RegisterExtension;
import org.junit.jupiter.api.io.TempDir;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Map;
import java.util.Random;
import java.util.Set;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicInteger;
import java.util.concurrent.atomic.AtomicReference;

import static org.assertj.core.api.Assertions.assertThat;
import static org.awaitility.Awaitility.await;

/**
 * Exactly-once under crashes: {@code bracket monitor} runs in a child JVM and is killed with
 * SIGKILL at random points while 200,000 events stream in; after the last restart the published
 * counts equal the events produced, and the rejected topic holds each unusable event once.
 */
class MonitorCrashRecoveryTest {

    private static final int EVENTS = 200_000;
    private static final int KILLS = 3;

    @RegisterExtension
    static final BrokerPerClass KAFKA = new BrokerPerClass();

    @TempDir
    static Path dir;

    @Test
    @DisplayName("a monitor killed with SIGKILL three times while events stream loses and double-counts nothing")
    void sigkillLosesAndDuplicatesNothing() throws Exception {
        List<TestEvents.Event> events = TestEvents.stream(EVENTS, 199, 21);
        List<TestEvents.Event> usable = events.stream().filter(TestEvents.Event::usable).toList();
        List<TestEvents.Event> bad = events.stream().filter(e -> !e.usable()).toList();
        Path config = dir.resolve("crash.yaml");
        Files.writeString(config, """
                studies:
                  - id: checkout
                    outcome: {min: 0, max: 1, better: lower}
                    assume: [[worst-case]]
                  - id: registry
                    outcome: {min: -5, max: 5}
                    assume: [[worst-case], [mtr-positive]]
                inputs:
                  - topic: crash-events
                topics: {rejected: crash-rejected, partials: crash-partials, bounds: crash-bounds, partitions: 3}
                windows:
                  - {name: hourly, kind: tumbling, size: 1h}
                commit-interval: 300ms
                publish-interval: 300ms
                progress-interval: 5s
                max-event-bytes: 1024
                group: crash
                instance: crash-child
                kafka:
                  bootstrap.servers: %s
                  session.timeout.ms: 6000
                  heartbeat.interval.ms: 1000
                """.formatted(KAFKA.bootstrapServers()));

        // Topics exist before the producer starts: a producer that auto-creates a topic while the
        // monitor creates it too can stall on its first batch.
        try (var admin = new KafkaClients(dev.bracket.config.BracketConfig.load(config)).admin()) {
            TopicSetup.ensureTopics(admin, dev.bracket.config.BracketConfig.load(config));
        }
        AtomicInteger sent = new AtomicInteger();
        AtomicReference<Throwable> producerFailure = new AtomicReference<>();
        // About 6,000 per second, so that the kills land mid-stream.
        List<ProducerRecord<byte[], byte[]>> records = events.stream()
                .map(e -> new ProducerRecord<>("crash-events", e.key(), e.value())).toList();
        Thread producing = new Thread(() -> {
            KafkaTestSupport.producePaced(KAFKA.broker(), records, 6_000, producerFailure);
            if (!Thread.currentThread().isInterrupted()) {
                sent.set(records.size()); // all sent and flushed
            }
        }, "test-producer");
        Random rnd = new Random(5);
        List<Path> logs = new ArrayList<>();
        List<Long> committedAtKill = new ArrayList<>();
        Process child = startChild(config, logs);
        producing.start();
        try (Admin admin = Admin.create(Map.of(AdminClientConfig.BOOTSTRAP_SERVERS_CONFIG, KAFKA.bootstrapServers()))) {
            for (int kill = 0; kill < KILLS; kill++) {
                // A random point of the stream after this child has committed progress of its own,
                // so that the next child must restore real state and a transaction is likely open.
                long from = committedOffsets(admin);
                long killAt = from + 2_000 + rnd.nextInt(10_000);
                await().atMost(Duration.ofSeconds(90)).until(() -> committedOffsets(admin) >= Math.min(killAt, events.size()));
                Process victim = child;
                victim.destroyForcibly(); // SIGKILL on Unix: no shutdown hook, no final commit
                assertThat(victim.waitFor(30, TimeUnit.SECONDS)).isTrue();
                assertThat(victim.exitValue()).isEqualTo(137);
                committedAtKill.add(committedOffsets(admin));
                child = startChild(config, logs);
            }
            producing.join(Duration.ofMinutes(3).toMillis());
            assertThat(producerFailure.get()).isNull();
            assertThat(sent.get()).isEqualTo(events.size());

            Map<String, Long> expected = armCounts(usable);
            await().atMost(Duration.ofSeconds(180)).pollInterval(Duration.ofSeconds(1)).untilAsserted(() -> {
                Map<String, JsonNode> docs = MonitorEndToEndTest.latestDocuments(KAFKA.broker(), "crash-bounds");
                for (String study : List.of("checkout", "registry")) {
                    assertThat(docs).containsKey(study + "/cumulative");
                    JsonNode arms = docs.get(study + "/cumulative").get("arms");
                    assertThat(arms.get("treated").get("n").asLong()).as(study + " treated").isEqualTo(expected.get(study + "/treated"));
                    assertThat(arms.get("control").get("n").asLong()).as(study + " control").isEqualTo(expected.get(study + "/control"));
                }
            });

            List<ConsumerRecord<byte[], byte[]>> rejected = KafkaTestSupport.readAll(KAFKA.broker(), "crash-rejected");
            Set<String> distinct = new HashSet<>();
            rejected.forEach(r -> distinct.add(new String(r.value(), StandardCharsets.UTF_8)));
            assertThat(rejected).hasSize(bad.size());
            assertThat(distinct).hasSize(bad.size());
            System.out.println("crash test: SIGKILL after committed input offsets " + committedAtKill + " of " + events.size());
            // The kills fell mid-stream, and every restarted child rebuilt its partitions from the partials topic.
            assertThat(committedAtKill).hasSize(KILLS).allMatch(c -> c > 0 && c < events.size());
            assertThat(logs).hasSize(KILLS + 1);
            for (Path log : logs) {
                assertThat(readLog(log)).contains("restored");
            }
            child.destroy(); // SIGTERM: the last child stops gracefully
            assertThat(child.waitFor(60, TimeUnit.SECONDS)).isTrue();
            assertThat(readLog(logs.get(logs.size() - 1))).contains("stopped after a final commit");
        } finally {
            child.destroyForcibly();
            producing.interrupt();
        }
    }

    /** Sum of the group's committed input offsets: how many events the monitor has committed. */
    private static long committedOffsets(Admin admin) throws Exception {
        return admin.listConsumerGroupOffsets("crash").partitionsToOffsetAndMetadata().get(30, TimeUnit.SECONDS)
                .values().stream().filter(java.util.Objects::nonNull).mapToLong(OffsetAndMetadata::offset).sum();
    }

    private static Map<String, Long> armCounts(List<TestEvents.Event> usable) {
        Map<String, Long> out = new java.util.HashMap<>();
        for (TestEvents.Event e : usable) {
            out.merge(e.study() + (e.treated() ? "/treated" : "/control"), 1L, Long::sum);
        }
        return out;
    }

    private static Process startChild(Path config, List<Path> logs) throws IOException {
        Path log = dir.resolve("child-" + logs.size() + ".log");
        logs.add(log);
        return ChildMonitor.start(config, log, "384m");
    }

    private static String readLog(Path log) throws IOException {
        return ChildMonitor.log(log);
    }
}
