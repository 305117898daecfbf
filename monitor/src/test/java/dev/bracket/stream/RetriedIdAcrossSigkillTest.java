package dev.bracket.stream;

import dev.bracket.app.TopicSetup;
import dev.bracket.stream.transaction.KafkaClients;
import dev.bracket.stream.transaction.RejectedCopies;
import com.fasterxml.jackson.databind.JsonNode;
import dev.bracket.broker.BrokerPerClass;
import dev.bracket.broker.ChildMonitor;
import dev.bracket.config.BracketConfig;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.admin.AdminClientConfig;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.OffsetAndMetadata;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.header.Header;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.RegisterExtension;
import org.junit.jupiter.api.io.TempDir;

import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Random;
import java.util.Set;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicReference;

import static org.assertj.core.api.Assertions.assertThat;
import static org.awaitility.Awaitility.await;

/**
 * Deduplication by id survives a crash: an at-least-once producer sends every third event a
 * second time, 3,000 events later (same id, same key), while {@code bracket monitor} runs in a
 * child JVM that is killed with SIGKILL mid-stream and started again. Many originals are
 * committed before the kill and retried after it, so only ids restored from the partials topic
 * can refuse them. Afterwards the published counts equal the distinct events and the rejected
 * topic holds each retry once, as {@code duplicate}.
 */
class RetriedIdAcrossSigkillTest {

    private static final int DISTINCT = 24_000;
    private static final int RETRY_DISTANCE = 3_000;
    private static final long START = 1_735_689_600_000L; // 2025-01-01T00:00:00Z

    @RegisterExtension
    static final BrokerPerClass KAFKA = new BrokerPerClass();

    @TempDir
    static Path dir;

    @Test
    @DisplayName("a retried id is counted once across a SIGKILL of the monitor")
    void retriedIdCountedOnceAcrossSigkill() throws Exception {
        Path config = dir.resolve("dedup.yaml");
        Files.writeString(config, """
                studies:
                  - id: checkout
                    outcome: {min: 0, max: 1}
                    assume: [[worst-case]]
                inputs:
                  - topic: dedup-events
                topics: {rejected: dedup-rejected, partials: dedup-partials, bounds: dedup-bounds, partitions: 2}
                commit-interval: 300ms
                publish-interval: 300ms
                group: dedup
                instance: dedup-child
                kafka:
                  bootstrap.servers: %s
                  session.timeout.ms: 6000
                  heartbeat.interval.ms: 1000
                """.formatted(KAFKA.bootstrapServers()));
        BracketConfig loaded = BracketConfig.load(config);
        try (var admin = new KafkaClients(loaded).admin()) {
            TopicSetup.ensureTopics(admin, loaded);
        }
        // The stream as sent: each distinct event once, and every third one again RETRY_DISTANCE events later.
        Random rnd = new Random(9);
        List<ProducerRecord<byte[], byte[]>> distinct = new ArrayList<>();
        long treated = 0;
        for (int i = 0; i < DISTINCT; i++) {
            boolean t = rnd.nextDouble() < 0.4;
            treated += t ? 1 : 0;
            String unit = "u" + rnd.nextInt(4_000);
            String json = String.format(Locale.ROOT,
                    "{\"study\":\"checkout\",\"id\":\"e-%d\",\"unit\":\"%s\",\"treated\":%s,\"outcome\":%s,\"time\":%d}",
                    i, unit, t, rnd.nextDouble() < 0.1 ? 1 : 0, START + 1_000L * i);
            distinct.add(new ProducerRecord<>("dedup-events", TestEvents.utf8(unit), TestEvents.utf8(json)));
        }
        List<ProducerRecord<byte[], byte[]>> sent = new ArrayList<>();
        int retries = 0;
        for (int i = 0; i < DISTINCT; i++) {
            sent.add(distinct.get(i));
            int original = i - RETRY_DISTANCE;
            if (original >= 0 && original % 3 == 0) {
                sent.add(distinct.get(original));
                retries++;
            }
        }

        List<Path> logs = new ArrayList<>();
        Process child = start(config, logs);
        AtomicReference<Throwable> failure = new AtomicReference<>();
        // About 5,000 per second, so that the kill lands mid-stream.
        Thread producing = new Thread(() -> KafkaTestSupport.producePaced(KAFKA.broker(), sent, 5_000, failure), "test-producer");
        // The stream starts once the child reads its partitions: on a busy machine a slow child would
        // otherwise read most of the stream as one backlog in one commit, and the kill would come too late.
        await().atMost(Duration.ofSeconds(120)).until(() -> ChildMonitor.log(logs.get(0)).contains("restored"));
        producing.start();
        try (Admin admin = Admin.create(Map.of(AdminClientConfig.BOOTSTRAP_SERVERS_CONFIG, KAFKA.bootstrapServers()))) {
            long killAt = sent.size() / 2;
            await().atMost(Duration.ofSeconds(180)).until(() -> committedOffsets(admin) >= killAt);
            child.destroyForcibly(); // SIGKILL: no shutdown hook, no final commit
            assertThat(child.waitFor(30, TimeUnit.SECONDS)).isTrue();
            assertThat(child.exitValue()).isEqualTo(137);
            long committedAtKill = committedOffsets(admin);
            child = start(config, logs);
            producing.join(Duration.ofMinutes(2).toMillis());
            assertThat(failure.get()).isNull();

            long control = DISTINCT - treated;
            long expectedTreated = treated;
            await().atMost(Duration.ofSeconds(120)).pollInterval(Duration.ofSeconds(1)).untilAsserted(() -> {
                JsonNode arms = MonitorEndToEndTest.latestDocuments(KAFKA.broker(), "dedup-bounds").get("checkout/cumulative").get("arms");
                assertThat(arms.get("treated").get("n").asLong()).as("treated").isEqualTo(expectedTreated);
                assertThat(arms.get("control").get("n").asLong()).as("control").isEqualTo(control);
            });
            List<ConsumerRecord<byte[], byte[]>> rejected = KafkaTestSupport.readAll(KAFKA.broker(), "dedup-rejected");
            Set<String> distinctRejected = new HashSet<>();
            for (ConsumerRecord<byte[], byte[]> r : rejected) {
                Header reason = r.headers().lastHeader(RejectedCopies.REASON_HEADER);
                assertThat(new String(reason.value(), StandardCharsets.UTF_8)).isEqualTo("duplicate");
                distinctRejected.add(new String(r.value(), StandardCharsets.UTF_8));
            }
            assertThat(rejected).hasSize(retries);
            assertThat(distinctRejected).hasSize(retries);
            // The kill fell mid-stream, with retries of committed originals still to come, and the new child restored state.
            System.out.println("dedup crash test: SIGKILL after " + committedAtKill + " of " + sent.size() + " committed records; "
                    + retries + " retries");
            assertThat(committedAtKill).isBetween(1L, (long) sent.size() - RETRY_DISTANCE);
            assertThat(ChildMonitor.log(logs.get(1))).contains("restored");
            child.destroy();
            assertThat(child.waitFor(60, TimeUnit.SECONDS)).isTrue();
        } finally {
            child.destroyForcibly();
            producing.interrupt();
        }
    }

    private static Process start(Path config, List<Path> logs) throws java.io.IOException {
        Path log = dir.resolve("child-" + logs.size() + ".log");
        logs.add(log);
        return ChildMonitor.start(config, log, "256m");
    }

    private static long committedOffsets(Admin admin) throws Exception {
        return admin.listConsumerGroupOffsets("dedup").partitionsToOffsetAndMetadata().get(30, TimeUnit.SECONDS)
                .values().stream().filter(java.util.Objects::nonNull).mapToLong(OffsetAndMetadata::offset).sum();
    }
}
