package dev.bracket.demo;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import org.apache.kafka.clients.producer.MockProducer;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.serialization.StringSerializer;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.io.ByteArrayInputStream;
import java.nio.charset.StandardCharsets;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneOffset;
import java.util.List;

import static org.assertj.core.api.Assertions.assertThat;

class DemoProducerTest {

    private static final ObjectMapper JSON = new ObjectMapper();
    private static final Clock FIXED = Clock.fixed(Instant.parse("2026-03-01T12:00:00Z"), ZoneOffset.UTC);

    private static MockProducer<String, String> mock() {
        return new MockProducer<>(true, null, new StringSerializer(), new StringSerializer());
    }

    @Test
    @DisplayName("simulated events carry study, unit, treated, outcome and time, keyed by unit")
    void simulatedEventsHaveTheAgreedShape() throws Exception {
        MockProducer<String, String> kafka = mock();
        DemoProducer sender = new DemoProducer(kafka, "outcomes", 0, FIXED);
        RolloutScenario scenario = new RolloutScenario(ScenarioConfig.defaults(7));
        sender.run(new ScenarioFeed(scenario, "rollout-a"), new DemoProducer.Limits(500, null), () -> false);

        List<ProducerRecord<String, String>> sent = kafka.history();
        assertThat(sent).hasSize(500);
        assertThat(sender.sent()).isEqualTo(500);
        assertThat(sender.acknowledged()).isEqualTo(500);
        for (ProducerRecord<String, String> r : sent) {
            JsonNode e = JSON.readTree(r.value());
            assertThat(r.topic()).isEqualTo("outcomes");
            assertThat(e.get("study").asText()).isEqualTo("rollout-a");
            assertThat(r.key()).isEqualTo(e.get("unit").asText());
            assertThat(e.get("treated").isBoolean()).isTrue();
            assertThat(e.get("outcome").asDouble()).isBetween(0.0, 1.0);
            assertThat(Instant.parse(e.get("time").asText())).isEqualTo(FIXED.instant());
            assertThat(e.has("stratum")).isFalse();
        }
        assertThat(sent.stream().map(ProducerRecord::key).distinct().count()).as("unit ids are unique").isEqualTo(500);
    }

    @Test
    @DisplayName("with strata on, each event names its host's region")
    void strataAreTheRegions() throws Exception {
        MockProducer<String, String> kafka = mock();
        RolloutScenario scenario = new RolloutScenario(new ScenarioConfig(400, 0.3, 0.7, -0.02, true, 7));
        new DemoProducer(kafka, "t", 0, FIXED).run(new ScenarioFeed(scenario, "s"), new DemoProducer.Limits(300, null), () -> false);
        for (ProducerRecord<String, String> r : kafka.history()) {
            assertThat(JSON.readTree(r.value()).get("stratum").asText()).isIn("east", "central", "west");
        }
    }

    @Test
    @DisplayName("the rate paces sending: n events at r per second take at least (n-1)/r seconds")
    void rateIsRespected() {
        MockProducer<String, String> kafka = mock();
        DemoProducer sender = new DemoProducer(kafka, "t", 1000, FIXED);
        long start = System.nanoTime();
        sender.run(new ScenarioFeed(new RolloutScenario(ScenarioConfig.defaults(1)), "s"),
                new DemoProducer.Limits(301, null), () -> false);
        double seconds = (System.nanoTime() - start) / 1e9;
        assertThat(kafka.history()).hasSize(301);
        assertThat(seconds).isGreaterThanOrEqualTo(0.3);
    }

    @Test
    @DisplayName("a duration limit stops an endless feed, and no more than rate x duration events go out")
    void durationStopsTheFeed() {
        MockProducer<String, String> kafka = mock();
        DemoProducer sender = new DemoProducer(kafka, "t", 100, FIXED);
        sender.run(new ScenarioFeed(new RolloutScenario(ScenarioConfig.defaults(1)), "s"),
                new DemoProducer.Limits(0, Duration.ofMillis(300)), () -> false);
        assertThat(kafka.history().size()).isBetween(1, 31);
    }

    @Test
    @DisplayName("with both a count and a duration, whichever is reached first stops the feed")
    void firstLimitWins() {
        MockProducer<String, String> byCount = mock();
        new DemoProducer(byCount, "t", 0, FIXED).run(new ScenarioFeed(new RolloutScenario(ScenarioConfig.defaults(1)), "s"),
                new DemoProducer.Limits(50, Duration.ofSeconds(30)), () -> false);
        assertThat(byCount.history()).hasSize(50);
        MockProducer<String, String> byTime = mock();
        new DemoProducer(byTime, "t", 100, FIXED).run(new ScenarioFeed(new RolloutScenario(ScenarioConfig.defaults(1)), "s"),
                new DemoProducer.Limits(1_000_000, Duration.ofMillis(300)), () -> false);
        assertThat(byTime.history().size()).isBetween(1, 31);
    }

    @Test
    @DisplayName("a file is sent line by line as written; blank lines are skipped and non-JSON lines are counted, not dropped")
    void fileLinesAreSentVerbatim() {
        String file = """
                {"study":"s","unit":"u1","treated":true,"outcome":0.9,"time":"2026-01-01T00:00:00Z"}

                not json at all
                {"study":"s","unit":"u2","treated":false,"outcome":0.7,"time":"2026-01-01T00:00:01Z"}
                """;
        MockProducer<String, String> kafka = mock();
        JsonlFileFeed feed = new JsonlFileFeed(new ByteArrayInputStream(file.getBytes(StandardCharsets.UTF_8)));
        new DemoProducer(kafka, "t", 0, FIXED).run(feed, DemoProducer.Limits.NONE, () -> false);

        assertThat(kafka.history()).extracting(ProducerRecord::value).containsExactly(
                "{\"study\":\"s\",\"unit\":\"u1\",\"treated\":true,\"outcome\":0.9,\"time\":\"2026-01-01T00:00:00Z\"}",
                "not json at all",
                "{\"study\":\"s\",\"unit\":\"u2\",\"treated\":false,\"outcome\":0.7,\"time\":\"2026-01-01T00:00:01Z\"}");
        assertThat(kafka.history()).extracting(ProducerRecord::key).containsExactly("u1", null, "u2");
        assertThat(feed.malformed()).isEqualTo(1);
        assertThat(feed.firstMalformedLine()).isEqualTo(3);
    }

    @Test
    @DisplayName("a stop request ends sending at once")
    void stopRequestEndsSending() {
        MockProducer<String, String> kafka = mock();
        new DemoProducer(kafka, "t", 0, FIXED).run(new ScenarioFeed(new RolloutScenario(ScenarioConfig.defaults(1)), "s"),
                DemoProducer.Limits.NONE, () -> true);
        assertThat(kafka.history()).isEmpty();
    }
}
