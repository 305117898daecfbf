package dev.bracket.alerts.delivery;


import dev.bracket.alerts.delivery.Receiver;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.bracket.broker.BrokerPerClass;
import dev.bracket.broker.ChildMonitor;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.serialization.StringSerializer;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.RegisterExtension;
import org.junit.jupiter.api.io.TempDir;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import java.util.Map;
import java.util.concurrent.TimeUnit;

import static org.assertj.core.api.Assertions.assertThat;
import static org.awaitility.Awaitility.await;

/**
 * Webhook delivery survives the monitor's stops and crashes: {@code bracket monitor} runs in a
 * child JVM against a real broker, raises stream-stalled transitions while the receiver is down,
 * is stopped with SIGTERM, started again, killed with SIGKILL, and started a third time with the
 * receiver up. The receiver must then hold every transition of the alerts topic exactly once, in
 * order, under its transition id as {@code Idempotency-Key}.
 */
class WebhookResumeAcrossRestartsTest {

    private static final ObjectMapper JSON = new ObjectMapper();
    private static final String ALERTS = "hook-alerts";
    private static final String KEY = "pager/*/*/stream-stalled";

    @RegisterExtension
    static final BrokerPerClass KAFKA = new BrokerPerClass();

    @TempDir
    static Path dir;

    @Test
    @DisplayName("the receiver gets every transition exactly once by key across a SIGTERM and a SIGKILL while it was down")
    void everyTransitionOnceAcrossStopAndCrash() throws Exception {
        Path config = dir.resolve("hook.yaml");
        try (Receiver receiver = new Receiver();
             KafkaProducer<String, String> events = new KafkaProducer<>(Map.of(
                     ProducerConfig.BOOTSTRAP_SERVERS_CONFIG, KAFKA.bootstrapServers(),
                     ProducerConfig.ACKS_CONFIG, "all"), new StringSerializer(), new StringSerializer())) {
            Files.writeString(config, """
                    studies:
                      - id: pager
                        outcome: {min: 0, max: 1}
                        assume: [[worst-case]]
                        alerts:
                          rules:
                            stream-stalled: {after: 2s}
                          webhooks:
                            - {url: "%s", timeout: 1s, retry-for: 5m, backoff-initial: 200ms, backoff-max: 1s}
                    inputs:
                      - topic: hook-events
                    topics: {rejected: hook-rejected, partials: hook-partials, bounds: hook-bounds, partitions: 1}
                    commit-interval: 200ms
                    publish-interval: 200ms
                    group: hook
                    instance: hook-child
                    alerts: {topic: %s, check-interval: 200ms}
                    kafka:
                      bootstrap.servers: %s
                      session.timeout.ms: 6000
                      heartbeat.interval.ms: 1000
                    """.formatted(receiver.url(), ALERTS, KAFKA.bootstrapServers()));
            List<Path> logs = new ArrayList<>();
            Process child = startChild(config, logs);
            try {
                // Receiver down. A study that never sent is silent: the stall fires, an event
                // resolves it, silence fires it again.
                awaitTransitions(1);
                Instant firstEvent = send(events);
                awaitTransitions(3);
                child.destroy(); // SIGTERM: a graceful stop with three transitions undelivered
                assertThat(child.waitFor(60, TimeUnit.SECONDS)).isTrue();
                assertThat(ChildMonitor.log(logs.get(0))).contains("stopped after a final commit");
                assertThat(receiver.requests()).isEmpty();

                child = startChild(config, logs);
                // The restart is no news: the stall that did not end stays firing, unannounced.
                await().atMost(Duration.ofSeconds(30)).until(() -> ChildMonitor.log(logs.get(1)).contains("resuming 3 transition(s)"));
                Thread.sleep(3000); // longer than the stall limit: time enough for a wrong resolve/fire pair
                assertThat(transitions()).as("no transition from the restart itself").hasSize(3);
                Instant secondEvent = send(events);
                awaitTransitions(4);
                child.destroyForcibly(); // SIGKILL: no shutdown hook, four transitions owed
                assertThat(child.waitFor(30, TimeUnit.SECONDS)).isTrue();
                assertThat(child.exitValue()).isEqualTo(137);
                assertThat(receiver.requests()).isEmpty();

                receiver.start(n -> 200);
                child = startChild(config, logs);
                // The owed four, then the stall firing again (the stream stays silent): five in all.
                await().atMost(Duration.ofSeconds(40)).pollInterval(Duration.ofMillis(250)).untilAsserted(() -> {
                    List<JsonNode> now = transitions();
                    assertThat(now).hasSizeGreaterThanOrEqualTo(5);
                    assertThat(receiver.uniqueDeliveries()).containsExactlyElementsOf(ids(now));
                });
                child.destroy();
                assertThat(child.waitFor(60, TimeUnit.SECONDS)).isTrue();

                List<JsonNode> written = transitions();
                assertThat(written).hasSize(5);
                for (int i = 0; i < written.size(); i++) {
                    assertThat(written.get(i).path("sequence").asLong()).isEqualTo(i + 1);
                    assertThat(written.get(i).path("state").asText()).isEqualTo(i % 2 == 0 ? "firing" : "resolved");
                }
                // The two resolutions were caused by the two events, not by a restart.
                assertThat(Instant.parse(written.get(1).path("at").asText())).isAfterOrEqualTo(firstEvent.minusSeconds(1));
                assertThat(Instant.parse(written.get(3).path("at").asText())).isAfterOrEqualTo(secondEvent.minusSeconds(1));

                List<Receiver.Request> taken = receiver.requests().stream().filter(r -> r.status() / 100 == 2).toList();
                assertThat(taken).as("exactly once: no transition taken twice").extracting(Receiver.Request::idempotencyKey)
                        .containsExactlyElementsOf(ids(written));
                for (Receiver.Request r : taken) {
                    assertThat(JSON.readTree(r.body()).path("transitionId").asText()).isEqualTo(r.idempotencyKey());
                }
            } finally {
                child.destroyForcibly();
                child.waitFor(30, TimeUnit.SECONDS);
            }
        }
    }

    private static Instant send(KafkaProducer<String, String> producer) throws Exception {
        Instant now = Instant.now();
        producer.send(new ProducerRecord<>("hook-events", "u1",
                "{\"study\":\"pager\",\"unit\":\"u1\",\"treated\":true,\"outcome\":0.5}")).get(30, TimeUnit.SECONDS);
        return now;
    }

    /** The documents of the stall key in the alerts topic, in sequence order. */
    private static List<JsonNode> transitions() {
        if (!topicExists()) {
            return List.of();
        }
        List<JsonNode> out = new ArrayList<>();
        for (ConsumerRecord<String, String> r : AlertRestartOnBrokerTest.records(KAFKA.broker(), ALERTS)) {
            if (KEY.equals(r.key())) {
                try {
                    out.add(JSON.readTree(r.value()));
                } catch (IOException e) {
                    throw new UncheckedIOException(e);
                }
            }
        }
        out.sort(Comparator.comparingLong(d -> d.path("sequence").asLong()));
        return out;
    }

    private static boolean topicExists() {
        try (var admin = org.apache.kafka.clients.admin.Admin.create(Map.of("bootstrap.servers", KAFKA.bootstrapServers()))) {
            return admin.listTopics().names().get(30, TimeUnit.SECONDS).contains(ALERTS);
        } catch (Exception e) {
            throw new IllegalStateException(e);
        }
    }

    private static List<String> ids(List<JsonNode> docs) {
        return docs.stream().map(d -> d.path("transitionId").asText()).toList();
    }

    private static void awaitTransitions(int n) {
        await().atMost(Duration.ofSeconds(30)).pollInterval(Duration.ofMillis(250)).until(() -> transitions().size() >= n);
    }

    private static Process startChild(Path config, List<Path> logs) throws IOException {
        Path log = dir.resolve("hook-child-" + logs.size() + ".log");
        logs.add(log);
        return ChildMonitor.start(config, log, "256m");
    }
}
