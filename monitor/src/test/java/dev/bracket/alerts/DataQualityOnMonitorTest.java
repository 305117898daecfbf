package dev.bracket.alerts;

import com.fasterxml.jackson.databind.JsonNode;
import dev.bracket.broker.BrokerPerClass;
import dev.bracket.config.BracketConfig;
import dev.bracket.report.store.LatestReports;
import dev.bracket.stream.ingest.EventParser;
import dev.bracket.app.Monitor;
import dev.bracket.stream.ingest.ParsedEvent;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.serialization.StringSerializer;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.RegisterExtension;
import org.junit.jupiter.api.io.TempDir;

import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;

import static org.assertj.core.api.Assertions.assertThat;
import static org.awaitility.Awaitility.await;

/**
 * The data-quality rule on a running monitor counts every rejected record: wrong-type events
 * that name the study (wherever the study field sits in the object) and lines no study can be
 * read from, not only outcomes out of range.
 */
class DataQualityOnMonitorTest {

    @RegisterExtension
    static final BrokerPerClass KAFKA = new BrokerPerClass();

    @TempDir
    static Path dir;

    /**
     * 500 lines, 12% rejected and none out of range: 40 wrong-type events naming the study (half
     * with the bad field before the study field) and 20 lines that are not JSON, spread evenly.
     */
    static List<String> lines() {
        List<String> out = new ArrayList<>();
        for (int i = 0; i < 500; i++) {
            String unit = "\"unit\":\"u" + i + "\"";
            if (i % 25 == 12) {
                out.add("{\"study\":\"clinic\"," + unit + ",\"treated\":tru"); // cut off: no study can be read
            } else if (i % 25 == 3 || i % 25 == 16) {
                out.add(i % 2 == 0
                        ? "{\"outcome\":\"high\",\"study\":\"clinic\"," + unit + ",\"treated\":true}"
                        : "{\"study\":\"clinic\"," + unit + ",\"treated\":\"yes\",\"outcome\":0.4}");
            } else {
                out.add("{\"study\":\"clinic\"," + unit + ",\"treated\":" + (i % 2 == 0) + ",\"outcome\":0." + (i % 10) + "}");
            }
        }
        return out;
    }

    /** One study with a data-quality limit of 5% over 10 minutes, judged every 200 ms. */
    private static BracketConfig config() throws Exception {
        Path config = dir.resolve("quality.yaml");
        Files.writeString(config, """
                studies:
                  - id: clinic
                    outcome: {min: 0, max: 1}
                    assume: [[worst-case]]
                    alerts:
                      rules:
                        data-quality: {max-rejected-share: 0.05, period: 10m, min-events: 100}
                inputs:
                  - topic: quality-events
                topics: {rejected: quality-rejected, partials: quality-partials, bounds: quality-bounds, partitions: 1}
                commit-interval: 200ms
                publish-interval: 200ms
                group: quality
                instance: quality-1
                alerts: {topic: quality-alerts, check-interval: 200ms}
                kafka:
                  bootstrap.servers: %s
                """.formatted(KAFKA.bootstrapServers()));
        return BracketConfig.load(config);
    }

    @Test
    @DisplayName("rejected events name their study when it can be read, wherever the study field sits")
    void rejectedEventsNameTheirStudy() throws Exception {
        BracketConfig c = config();
        EventParser parser = new EventParser(c.studies(), c.inputs().get(0).fields(), c.maxEventBytes(), c.maxClockSkew());
        Map<String, String> expected = Map.of(
                "{\"outcome\":\"high\",\"study\":\"clinic\",\"unit\":\"u\",\"treated\":true}", "wrong-type clinic",
                "{\"study\":\"clinic\",\"unit\":[1],\"treated\":true,\"outcome\":0.2}", "wrong-type clinic",
                "{\"study\":\"clinic\",\"treated\":true,\"outcome\":0.2}", "missing-field clinic",
                "{\"study\":\"clinic\",\"unit\":\"u\",\"treated\":true,\"outcome\":3}", "out-of-range clinic",
                "{\"study\":\"other\",\"unit\":\"u\",\"treated\":true,\"outcome\":0.2}", "unknown-study none",
                "{\"unit\":\"u\",\"treated\":true,\"outcome\":0.2}", "missing-field none",
                "{\"study\":\"clinic\",\"unit\":\"u\",\"treated\":tru", "bad-json none");
        expected.forEach((line, want) -> {
            ParsedEvent e = parser.parse(line.getBytes(StandardCharsets.UTF_8), 0);
            assertThat(e.rejection().id() + " " + (e.study() == null ? "none" : e.study().id())).as(line).isEqualTo(want);
            assertThat(e.studyIndex() >= 0).as(line).isEqualTo(e.study() != null);
        });
    }

    @Test
    @DisplayName("a stream with 12% rejected lines (limit 5%) raises the data-quality alert, counting both kinds")
    void twelvePercentRejectedFires() throws Exception {
        List<String> lines = lines();
        assertThat(lines.stream().filter(l -> l.contains("\"high\"") || l.contains("\"yes\"")).count()).isEqualTo(40);
        assertThat(lines.stream().filter(l -> l.endsWith("tru")).count()).isEqualTo(20);
        try (Monitor monitor = Monitor.start(config(), new SimpleMeterRegistry(), new LatestReports());
             KafkaProducer<String, String> producer = new KafkaProducer<>(Map.of(
                     ProducerConfig.BOOTSTRAP_SERVERS_CONFIG, KAFKA.bootstrapServers(), ProducerConfig.ACKS_CONFIG, "all"),
                     new StringSerializer(), new StringSerializer())) {
            for (String line : lines) {
                producer.send(new ProducerRecord<>("quality-events", line));
            }
            producer.flush();
            // The listing gets the transition just after the state changes: wait for the document itself.
            await().atMost(Duration.ofSeconds(30)).until(() -> monitor.alerts().apiView().path("recent").size() > 0);
            JsonNode fired = monitor.alerts().apiView().path("recent").get(0);
            assertThat(fired.path("rule").asText()).isEqualTo("data-quality");
            assertThat(fired.path("state").asText()).isEqualTo("firing");
            assertThat(monitor.alerts().firing()).extracting(s -> s.key().rule()).containsExactly(AlertRule.DATA_QUALITY);
            JsonNode evidence = fired.path("evidence");
            // Whatever prefix of the stream the first judgement saw, both kinds were counted in it.
            assertThat(evidence.path("rejected").asLong()).as("wrong-type events naming the study").isPositive();
            assertThat(evidence.path("unattributed").asLong()).as("lines without a readable study").isPositive();
            assertThat(evidence.path("outOfRange").asLong()).isZero();
            assertThat(evidence.path("rejectedShare").asDouble()).isGreaterThan(0.05);
        }
    }
}
