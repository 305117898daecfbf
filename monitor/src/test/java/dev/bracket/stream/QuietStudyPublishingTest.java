package dev.bracket.stream;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.bracket.app.Monitor;
import dev.bracket.broker.BrokerPerClass;
import dev.bracket.config.BracketConfig;
import dev.bracket.report.store.LatestReports;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.admin.AdminClientConfig;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.config.ConfigResource;
import org.apache.kafka.common.config.TopicConfig;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.RegisterExtension;
import org.junit.jupiter.api.io.TempDir;

import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Set;

import static org.assertj.core.api.Assertions.assertThat;
import static org.awaitility.Awaitility.await;

/**
 * Incremental publishing against a real broker in this JVM: a study whose statistics do not
 * change is not published again while another study's events keep arriving (and move the
 * watermark within the same hourly pane), and the bounds topic is compacted so that its latest
 * document stays readable.
 */
class QuietStudyPublishingTest {

    private static final ObjectMapper JSON = new ObjectMapper();
    private static final long START = 1_735_689_600_000L; // 2025-01-01T00:00:00Z

    @RegisterExtension
    static final BrokerPerClass KAFKA = new BrokerPerClass();

    @TempDir
    static Path dir;

    @Test
    @DisplayName("a quiet study keeps its one document while a busy one is republished; the bounds topic is compacted")
    void quietStudyIsNotRepublished() throws Exception {
        Path configFile = dir.resolve("quiet.yaml");
        Files.writeString(configFile, """
                studies:
                  - id: busy
                    outcome: {min: 0, max: 1}
                  - id: quiet
                    outcome: {min: 0, max: 1}
                inputs:
                  - topic: q-events
                topics: {rejected: q-rejected, partials: q-partials, bounds: q-bounds, partitions: 3}
                windows:
                  - {name: hourly, kind: tumbling, size: 1h}
                commit-interval: 200ms
                publish-interval: 200ms
                group: q
                instance: q-1
                kafka:
                  bootstrap.servers: %s
                """.formatted(KAFKA.bootstrapServers()));
        BracketConfig config = BracketConfig.load(configFile);
        try (Monitor monitor = Monitor.start(config, new SimpleMeterRegistry(), new LatestReports());
             KafkaProducer<byte[], byte[]> producer = KafkaTestSupport.producer(KAFKA.broker())) {
            int second = 0;
            for (int i = 0; i < 100; i++) {
                send(producer, "busy", i, second++);
                send(producer, "quiet", i, second++);
            }
            producer.flush();
            await().atMost(Duration.ofSeconds(60)).pollInterval(Duration.ofMillis(300)).untilAsserted(() -> {
                assertThat(count("busy/cumulative")).isEqualTo(100);
                assertThat(count("quiet/cumulative")).isEqualTo(100);
            });
            List<ConsumerRecord<byte[], byte[]>> before = KafkaTestSupport.readAll(KAFKA.broker(), "q-bounds");
            long quietBefore = records(before, "quiet/");
            long busyRevision = latest(before, "busy/cumulative").get("revision").asLong();

            // Three more batches for the busy study only, each published before the next; all within the first hour.
            for (int batch = 1; batch <= 3; batch++) {
                for (int i = 0; i < 50; i++) {
                    send(producer, "busy", 100 * batch + i, second++);
                }
                producer.flush();
                long expected = 100 + 50L * batch;
                await().atMost(Duration.ofSeconds(60)).pollInterval(Duration.ofMillis(300))
                        .untilAsserted(() -> assertThat(count("busy/cumulative")).isEqualTo(expected));
            }
            List<ConsumerRecord<byte[], byte[]>> after = KafkaTestSupport.readAll(KAFKA.broker(), "q-bounds");
            assertThat(latest(after, "busy/cumulative").get("revision").asLong()).isGreaterThanOrEqualTo(busyRevision + 3);
            assertThat(records(after, "quiet/")).as("documents of the quiet study").isEqualTo(quietBefore);
            assertThat(latest(after, "quiet/cumulative").get("arms").get("treated").get("n").asLong()
                    + latest(after, "quiet/cumulative").get("arms").get("control").get("n").asLong()).isEqualTo(100);
        }
        try (Admin admin = Admin.create(Map.of(AdminClientConfig.BOOTSTRAP_SERVERS_CONFIG, KAFKA.bootstrapServers()))) {
            ConfigResource bounds = new ConfigResource(ConfigResource.Type.TOPIC, "q-bounds");
            String policy = admin.describeConfigs(Set.of(bounds)).all().get().get(bounds).get(TopicConfig.CLEANUP_POLICY_CONFIG).value();
            assertThat(policy).isEqualTo(TopicConfig.CLEANUP_POLICY_COMPACT);
        }
    }

    /** Event {@code i} of a study: treated when i is odd, outcome i mod 2 (so each arm's mean is known). */
    private static void send(KafkaProducer<byte[], byte[]> producer, String study, int i, int second) {
        String json = String.format(Locale.ROOT, "{\"study\":\"%s\",\"unit\":\"%s-%d\",\"treated\":%s,\"outcome\":%d,\"time\":%d}",
                study, study, i, i % 2 == 1, i % 2, START + 1_000L * second);
        producer.send(new ProducerRecord<>("q-events", (study + i).getBytes(StandardCharsets.UTF_8), json.getBytes(StandardCharsets.UTF_8)));
    }

    /** Events counted in the newest document of a key (both arms), 0 before the first. */
    private static long count(String key) throws Exception {
        JsonNode doc = latest(KafkaTestSupport.readAll(KAFKA.broker(), "q-bounds"), key);
        return doc == null ? 0 : doc.get("arms").get("treated").get("n").asLong() + doc.get("arms").get("control").get("n").asLong();
    }

    private static JsonNode latest(List<ConsumerRecord<byte[], byte[]>> records, String key) throws Exception {
        JsonNode out = null;
        for (ConsumerRecord<byte[], byte[]> r : records) {
            if (new String(r.key(), StandardCharsets.UTF_8).equals(key)) {
                out = JSON.readTree(r.value());
            }
        }
        return out;
    }

    private static long records(List<ConsumerRecord<byte[], byte[]>> records, String keyPrefix) {
        return records.stream().filter(r -> new String(r.key(), StandardCharsets.UTF_8).startsWith(keyPrefix)).count();
    }
}
