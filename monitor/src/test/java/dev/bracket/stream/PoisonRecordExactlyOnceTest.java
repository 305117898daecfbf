package dev.bracket.stream;

import dev.bracket.app.Monitor;

import dev.bracket.app.TopicSetup;

import dev.bracket.stream.transaction.KafkaClients;

import dev.bracket.broker.BrokerPerClass;
import dev.bracket.config.BracketConfig;
import dev.bracket.report.store.LatestReports;
import dev.bracket.report.store.PublishedReport;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.serialization.ByteArraySerializer;
import org.apache.kafka.common.header.Header;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.RegisterExtension;

import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.time.Instant;
import java.time.temporal.ChronoUnit;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Optional;
import java.util.TreeMap;

import static org.assertj.core.api.Assertions.assertThat;
import static org.awaitility.Awaitility.await;

/**
 * Single hostile records between good ones, against a real broker in this JVM, with a restart
 * of the monitor in between: an event time far beyond epoch milliseconds once killed the
 * aggregation thread, and the consumer's close then committed the cells without their offsets,
 * so the restarted monitor counted the events before it twice (200 for 150 here). A year-9999
 * time must not become the watermark. Every good event counts exactly once; each poison record
 * is on the rejected topic once, with its reason.
 */
class PoisonRecordExactlyOnceTest {

    @RegisterExtension
    static final BrokerPerClass KAFKA = new BrokerPerClass();

    private static final String HUGE_TIME = "+999999999-12-31T23:59:59Z";
    private static final String YEAR_9999 = "9999-12-31T23:59:59Z";

    @Test
    @DisplayName("poison records are rejected with a reason, the monitor keeps going, and a restart counts nothing twice")
    void poisonIsRejectedAndNothingIsCountedTwice() throws Exception {
        BracketConfig config = BracketConfig.parse("poison.yaml", """
                studies:
                  - id: s1
                    outcome: {min: 0, max: 1}
                    assume: [[worst-case]]
                inputs:
                  - topic: poison-events
                topics: {rejected: poison-rejected, partials: poison-partials, bounds: poison-bounds, partitions: 1}
                windows:
                  - {name: hourly, kind: tumbling, size: 1h}
                commit-interval: 200ms
                publish-interval: 200ms
                group: poison
                instance: poison-1
                kafka:
                  bootstrap.servers: %s
                """.formatted(KAFKA.bootstrapServers()));
        try (var admin = new KafkaClients(config).admin()) {
            TopicSetup.ensureTopics(admin, config);
        }
        // Good events in the current hour: 100 committed first, then 50 with the poison among them.
        long hour = Instant.now().truncatedTo(ChronoUnit.HOURS).toEpochMilli();
        List<String> lines = new ArrayList<>();
        for (int i = 0; i < 150; i++) {
            if (i == 125) {
                lines.add("{\"study\":\"s1\",\"unit\":1,\"treated\":true,\"outcome\":0.5,\"time\":\"" + HUGE_TIME + "\"}");
            }
            if (i == 140) {
                lines.add("{\"study\":\"s1\",\"unit\":2,\"treated\":true,\"outcome\":0.5,\"time\":\"" + YEAR_9999 + "\"}");
            }
            lines.add(String.format(Locale.ROOT, "{\"study\":\"s1\",\"unit\":\"u%d\",\"treated\":%s,\"outcome\":0.5,\"time\":%d}",
                    i, i % 3 == 0, hour + i));
        }
        LatestReports first = new LatestReports();
        try (Monitor monitor = Monitor.start(config, new SimpleMeterRegistry(), first)) {
            send(lines.subList(0, 100));
            await().atMost(Duration.ofSeconds(30)).until(() -> units(first, "cumulative") == 100);
            send(lines.subList(100, lines.size()));
            // Under the fault this never reaches 150, and the close committed cells without their offsets.
            awaitQuietly(() -> units(first, "cumulative") == 150, Duration.ofSeconds(10));
        }
        LatestReports second = new LatestReports();
        try (Monitor monitor = Monitor.start(config, new SimpleMeterRegistry(), second)) {
            awaitQuietly(() -> units(second, "cumulative") == 150, Duration.ofSeconds(10));
        }
        LatestReports last = new LatestReports();
        try (Monitor monitor = Monitor.start(config, new SimpleMeterRegistry(), last)) {
            await().atMost(Duration.ofSeconds(30)).until(() -> units(last, "cumulative") > 0);
            awaitQuietly(() -> units(last, "cumulative") > 150, Duration.ofSeconds(3)); // room for a double count to show
            assertThat(units(last, "cumulative")).as("units counted after two restarts").isEqualTo(150);
            // The year-9999 event did not move the watermark: the hourly window is this hour's and holds every event.
            assertThat(units(last, "hourly")).as("units in the hourly window").isEqualTo(150);
            assertThat(monitor.readiness().get("status")).isEqualTo("ok");
        }
        Map<String, String> reasons = new TreeMap<>();
        for (ConsumerRecord<byte[], byte[]> r : KafkaTestSupport.readAll(KAFKA.broker(), "poison-rejected")) {
            Header reason = r.headers().lastHeader("bracket.reason");
            reasons.put(new String(r.value(), StandardCharsets.UTF_8), new String(reason.value(), StandardCharsets.UTF_8));
        }
        assertThat(reasons).containsOnlyKeys(lines.get(125), lines.get(141));
        assertThat(reasons.get(lines.get(125))).isEqualTo("time-unrepresentable");
        assertThat(reasons.get(lines.get(141))).isEqualTo("time-too-far-ahead");
    }

    /** Sends the lines as one batch (long linger), so that the monitor reads them in one poll. */
    private static void send(List<String> lines) {
        try (KafkaProducer<byte[], byte[]> producer = new KafkaProducer<>(Map.of(
                ProducerConfig.BOOTSTRAP_SERVERS_CONFIG, KAFKA.bootstrapServers(), ProducerConfig.LINGER_MS_CONFIG, 1000,
                ProducerConfig.ACKS_CONFIG, "all"), new ByteArraySerializer(), new ByteArraySerializer())) {
            for (String line : lines) {
                producer.send(new ProducerRecord<>("poison-events", line.getBytes(StandardCharsets.UTF_8)));
            }
            producer.flush();
        }
    }

    private static long units(LatestReports latest, String window) {
        Optional<PublishedReport> r = latest.get("s1", window);
        return r.map(p -> p.report().pooled().total()).orElse(0L);
    }

    /** Waits until the condition holds or the time is up, without failing: the assertions that follow decide. */
    private static void awaitQuietly(java.util.concurrent.Callable<Boolean> condition, Duration limit) throws Exception {
        long deadline = System.nanoTime() + limit.toNanos();
        while (System.nanoTime() < deadline && !condition.call()) {
            Thread.sleep(100);
        }
    }
}
