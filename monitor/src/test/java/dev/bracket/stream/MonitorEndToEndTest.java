package dev.bracket.stream;

import dev.bracket.stream.transaction.RejectedCopies;

import dev.bracket.stream.transaction.StreamAggregator;
import dev.bracket.app.Monitor;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.bracket.broker.BrokerPerClass;
import dev.bracket.broker.EmbeddedBroker;
import dev.bracket.cli.BracketCommand;
import dev.bracket.config.BracketConfig;
import dev.bracket.report.store.LatestReports;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import org.apache.commons.math3.stat.descriptive.SummaryStatistics;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.header.Header;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.RegisterExtension;
import org.junit.jupiter.api.io.TempDir;
import picocli.CommandLine;

import java.io.PrintWriter;
import java.io.StringWriter;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.TreeMap;
import java.util.stream.Collectors;

import static org.assertj.core.api.Assertions.assertThat;
import static org.awaitility.Awaitility.await;

/**
 * The monitor against a real broker in this JVM: what it publishes equals what {@code replay}
 * computes from the same events, and unusable events land on the rejected topic with their
 * reason and origin in headers.
 */
class MonitorEndToEndTest {

    private static final ObjectMapper JSON = new ObjectMapper();

    @RegisterExtension
    static final BrokerPerClass KAFKA = new BrokerPerClass();

    @TempDir
    static Path dir;

    static String config(String bootstrap) {
        return """
                studies:
                  - id: checkout
                    outcome: {min: 0, max: 1, better: lower}
                    assume: [[worst-case], [mts-negative], [optimizing-selection, sorting-on-gains]]
                  - id: registry
                    outcome: {min: -5, max: 5}
                    assume: [[worst-case], [mtr-positive], [mtr-positive, mts-positive]]
                inputs:
                  - topic: e2e-events
                topics: {rejected: e2e-rejected, partials: e2e-partials, bounds: e2e-bounds, partitions: 3}
                windows:
                  - {name: hourly, kind: tumbling, size: 1h}
                  - {name: two-hours, kind: sliding, size: 2h, step: 1h}
                grace: 10m
                band-level: 0.9
                commit-interval: 200ms
                publish-interval: 200ms
                max-event-bytes: 1024
                group: e2e
                instance: e2e-1
                kafka:
                  bootstrap.servers: %s
                """.formatted(bootstrap);
    }

    @Test
    @DisplayName("published reports equal replay on the same events; rejected events carry reason and origin")
    void liveEqualsReplayAndRejectsAreRouted() throws Exception {
        List<TestEvents.Event> events = new ArrayList<>(TestEvents.stream(20_000, 97, 11));
        events.addAll(TestEvents.late(40, 12));
        Path configFile = dir.resolve("e2e.yaml");
        Files.writeString(configFile, config(KAFKA.bootstrapServers()));
        Path eventsFile = dir.resolve("events.jsonl");
        Files.write(eventsFile, events.stream().map(e -> new String(e.value(), StandardCharsets.UTF_8)).toList());

        BracketConfig config = BracketConfig.load(configFile);
        SimpleMeterRegistry registry = new SimpleMeterRegistry();
        try (Monitor monitor = Monitor.start(config, registry, new LatestReports());
             KafkaProducer<byte[], byte[]> producer = KafkaTestSupport.producer(KAFKA.broker())) {
            for (TestEvents.Event e : events) {
                producer.send(new ProducerRecord<>("e2e-events", e.key(), e.value()));
            }
            producer.flush();

            JsonNode replay = replayJson(configFile, eventsFile);
            // Replay reports every window; the monitor publishes the one holding the newest event,
            // which for both windows (step 1 h) ends where the newest hourly pane ends.
            String newestEnd = "";
            for (JsonNode r : replay.get("reports")) {
                if (r.get("window").asText().equals("hourly") && r.get("windowEnd").asText().compareTo(newestEnd) > 0) {
                    newestEnd = r.get("windowEnd").asText();
                }
            }
            Map<String, JsonNode> expected = new TreeMap<>();
            for (JsonNode r : replay.get("reports")) {
                if (r.get("windowEnd").isNull() || r.get("windowEnd").asText().equals(newestEnd)) {
                    expected.put(r.get("study").asText() + "/" + r.get("window").asText(), r);
                }
            }
            assertThat(expected).hasSize(6);

            await().atMost(Duration.ofSeconds(120)).pollInterval(Duration.ofMillis(500)).untilAsserted(() -> {
                Map<String, JsonNode> live = latestDocuments("e2e-bounds");
                assertThat(live.keySet()).isEqualTo(expected.keySet());
                expected.forEach((key, doc) -> JsonClose.assertClose(live.get(key), doc, Set.of("revision", "computedAt")));
            });

            // Outside check of the pooled arm means: Commons Math over the produced outcomes.
            Map<String, JsonNode> live = latestDocuments("e2e-bounds");
            for (String study : List.of("checkout", "registry")) {
                for (boolean treated : new boolean[] {true, false}) {
                    SummaryStatistics s = new SummaryStatistics();
                    events.stream().filter(e -> e.usable() && e.study().equals(study) && e.treated() == treated)
                            .forEach(e -> s.addValue(e.outcome()));
                    JsonNode arm = live.get(study + "/cumulative").get("arms").get(treated ? "treated" : "control");
                    assertThat(arm.get("n").asLong()).isEqualTo(s.getN());
                    assertThat(arm.get("mean").asDouble()).isCloseTo(s.getMean(), org.assertj.core.data.Offset.offset(1e-12));
                }
            }
            assertThat(live.get("checkout/hourly").get("lateEvents").asLong()).isEqualTo(40);
            // Both confidence bands ride along with every row (compared with replay above).
            JsonNode bands = live.get("registry/cumulative").get("bounds").get(1).get("bands");
            assertThat(bands).hasSize(2);
            assertThat(bands.get(0).get("level").asDouble()).isEqualTo(0.9);
            assertThat(live.get("checkout/cumulative").get("lateEvents").asLong()).isZero();

            // Rejected events: original bytes, reason and origin in headers, nothing else.
            List<TestEvents.Event> bad = events.stream().filter(e -> !e.usable()).toList();
            List<ConsumerRecord<byte[], byte[]>> rejected = KafkaTestSupport.readAll(KAFKA.broker(), "e2e-rejected");
            assertThat(rejected).hasSize(bad.size());
            Map<String, String> reasonByValue = new HashMap<>();
            bad.forEach(e -> reasonByValue.put(new String(e.value(), StandardCharsets.UTF_8), e.rejectReason()));
            for (ConsumerRecord<byte[], byte[]> r : rejected) {
                String value = new String(r.value(), StandardCharsets.UTF_8);
                assertThat(reasonByValue).containsKey(value);
                assertThat(header(r, RejectedCopies.REASON_HEADER)).isEqualTo(reasonByValue.get(value));
                assertThat(header(r, RejectedCopies.DETAIL_HEADER)).isNotBlank();
                assertThat(header(r, RejectedCopies.SOURCE_TOPIC_HEADER)).isEqualTo("e2e-events");
                assertThat(Integer.parseInt(header(r, RejectedCopies.SOURCE_PARTITION_HEADER))).isBetween(0, 2);
                assertThat(Long.parseLong(header(r, RejectedCopies.SOURCE_OFFSET_HEADER))).isNotNegative();
            }
            Map<String, Long> byReason = bad.stream().collect(Collectors.groupingBy(TestEvents.Event::rejectReason, Collectors.counting()));
            assertThat(byReason).hasSize(6);
            byReason.forEach((reason, n) -> assertThat(monitor.metrics().total("bracket.events.rejected", "reason", reason))
                    .as(reason).isEqualTo(n));
            assertThat(monitor.metrics().total("bracket.events", "result", "accepted")).isEqualTo(events.size() - bad.size());
            assertThat(monitor.metrics().total("bracket.events.late", "window", "hourly")).isEqualTo(40);
            // Consumer lag comes from Kafka's own consumer metrics, bound into the same registry.
            assertThat(registry.find("kafka.consumer.fetch.manager.records.lag.max").gauges()).isNotEmpty();
        }
    }

    static JsonNode replayJson(Path configFile, Path eventsFile) throws Exception {
        StringWriter out = new StringWriter();
        StringWriter err = new StringWriter();
        CommandLine cl = BracketCommand.newCommandLine();
        cl.setOut(new PrintWriter(out));
        cl.setErr(new PrintWriter(err));
        int code = cl.execute("replay", "--config", configFile.toString(), "--json", eventsFile.toString());
        assertThat(code).as(err.toString()).isZero();
        return JSON.readTree(out.toString());
    }

    /** The newest document per key on a bounds topic. */
    static Map<String, JsonNode> latestDocuments(String topic) throws Exception {
        return latestDocuments(KAFKA.broker(), topic);
    }

    static Map<String, JsonNode> latestDocuments(EmbeddedBroker broker, String topic) throws Exception {
        Map<String, JsonNode> out = new TreeMap<>();
        for (ConsumerRecord<byte[], byte[]> r : KafkaTestSupport.readAll(broker, topic)) {
            out.put(new String(r.key(), StandardCharsets.UTF_8), JSON.readTree(r.value()));
        }
        return out;
    }

    private static String header(ConsumerRecord<byte[], byte[]> r, String name) {
        Header h = r.headers().lastHeader(name);
        return h == null ? null : new String(h.value(), StandardCharsets.UTF_8);
    }
}
