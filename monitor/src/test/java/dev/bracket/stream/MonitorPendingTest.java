package dev.bracket.stream;

import dev.bracket.report.store.LatestReports;

import com.fasterxml.jackson.databind.JsonNode;
import dev.bracket.app.Monitor;
import dev.bracket.broker.BrokerPerClass;
import dev.bracket.config.BracketConfig;
import dev.bracket.demo.EventFeed;
import dev.bracket.demo.RegistryScenario;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.RegisterExtension;
import org.junit.jupiter.api.io.TempDir;

import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.TreeMap;

import static org.assertj.core.api.Assertions.assertThat;
import static org.awaitility.Awaitility.await;

/**
 * Exposure events through the live monitor on a real broker: its published documents (pending
 * counts, pending-aware bounds and bands, lost to follow-up) equal what {@code replay} computes
 * from the same events.
 */
class MonitorPendingTest {

    @RegisterExtension
    static final BrokerPerClass KAFKA = new BrokerPerClass();

    @TempDir
    static Path dir;

    @Test
    @DisplayName("with exposures, outcomes carrying exposure times and a follow-up horizon, live equals replay")
    void liveEqualsReplayWithPendingOutcomes() throws Exception {
        Path configFile = dir.resolve("pending.yaml");
        Files.writeString(configFile, """
                studies:
                  - id: registry
                    outcome: {min: 0, max: 1}
                    follow-up: 1d
                    assume: [worst-case, missing-at-random, "mtr-positive,mts-positive"]
                inputs:
                  - topic: pending-events
                topics: {rejected: pending-rejected, partials: pending-partials, bounds: pending-bounds, partitions: 3}
                commit-interval: 200ms
                publish-interval: 200ms
                group: pending
                instance: pending-1
                kafka:
                  bootstrap.servers: %s
                """.formatted(KAFKA.bootstrapServers()));
        EventFeed feed = new RegistryScenario("registry", 3);
        List<EventFeed.KeyedLine> lines = new ArrayList<>();
        for (int i = 0; i < 6_000; i++) {
            lines.add(feed.next(Instant.EPOCH));
        }
        Path eventsFile = dir.resolve("pending.jsonl");
        Files.write(eventsFile, lines.stream().map(EventFeed.KeyedLine::value).toList());

        BracketConfig config = BracketConfig.load(configFile);
        try (Monitor monitor = Monitor.start(config, new SimpleMeterRegistry(), new LatestReports());
             KafkaProducer<byte[], byte[]> producer = KafkaTestSupport.producer(KAFKA.broker())) {
            for (EventFeed.KeyedLine line : lines) {
                producer.send(new ProducerRecord<>("pending-events", line.key().getBytes(StandardCharsets.UTF_8),
                        line.value().getBytes(StandardCharsets.UTF_8)));
            }
            producer.flush();
            JsonNode replay = MonitorEndToEndTest.replayJson(configFile, eventsFile);
            Map<String, JsonNode> expected = new TreeMap<>();
            replay.get("reports").forEach(r -> expected.put(r.get("study").asText() + "/" + r.get("window").asText(), r));
            JsonNode cumulative = expected.get("registry/cumulative");
            assertThat(cumulative.get("arms").get("treated").get("pending").asLong()).isPositive();
            assertThat(cumulative.get("lostToFollowUp").get("treated").asLong()).isPositive();

            await().atMost(Duration.ofSeconds(120)).pollInterval(Duration.ofMillis(500)).untilAsserted(() -> {
                Map<String, JsonNode> live = MonitorEndToEndTest.latestDocuments(KAFKA.broker(), "pending-bounds");
                assertThat(live.keySet()).isEqualTo(expected.keySet());
                expected.forEach((key, doc) -> JsonClose.assertClose(live.get(key), doc, Set.of("revision", "computedAt")));
            });
        }
    }
}
