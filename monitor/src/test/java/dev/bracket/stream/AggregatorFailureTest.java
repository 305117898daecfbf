package dev.bracket.stream;

import dev.bracket.app.Monitor;
import dev.bracket.app.TopicSetup;
import dev.bracket.broker.BrokerPerClass;
import dev.bracket.config.BracketConfig;
import dev.bracket.report.store.LatestReports;
import dev.bracket.stream.transaction.KafkaClients;
import dev.bracket.stream.transaction.StreamAggregator;
import dev.bracket.stream.transaction.StreamMetrics;
import io.micrometer.core.instrument.Counter;
import io.micrometer.core.instrument.Meter;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.RegisterExtension;

import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.util.Locale;

import static org.assertj.core.api.Assertions.assertThat;
import static org.awaitility.Awaitility.await;

/**
 * An aggregation member that fails with an unexpected error (here a counter throws when the
 * meters are first counted, after its first commit, while later polls' panes may be held) records the failure, aborts its open
 * transaction and commits nothing on its way out, not even when closing its consumer revokes
 * its partitions; a monitor started afterwards counts every event exactly once.
 */
class AggregatorFailureTest {

    @RegisterExtension
    static final BrokerPerClass KAFKA = new BrokerPerClass();

    @Test
    @DisplayName("after an unexpected error a member stops, reports why, commits nothing more, and a restart counts each event once")
    void failedMemberCommitsNothingMore() throws Exception {
        BracketConfig config = BracketConfig.parse("failure.yaml", """
                studies:
                  - id: s1
                    outcome: {min: 0, max: 1}
                    assume: [[worst-case]]
                inputs:
                  - topic: failure-events
                topics: {rejected: failure-rejected, partials: failure-partials, bounds: failure-bounds, partitions: 1}
                commit-interval: 200ms
                publish-interval: 200ms
                group: failure
                instance: failure-1
                kafka:
                  bootstrap.servers: %s
                """.formatted(KAFKA.bootstrapServers()));
        int partials;
        try (var admin = new KafkaClients(config).admin()) {
            partials = TopicSetup.ensureTopics(admin, config);
        }
        long now = System.currentTimeMillis();
        try (KafkaProducer<byte[], byte[]> producer = KafkaTestSupport.producer(KAFKA.broker())) {
            for (int i = 0; i < 200; i++) {
                String json = String.format(Locale.ROOT, "{\"study\":\"s1\",\"unit\":%d,\"treated\":%s,\"outcome\":0.5,\"time\":%d}",
                        i, i % 2 == 0, now);
                producer.send(new ProducerRecord<>("failure-events", json.getBytes(StandardCharsets.UTF_8)));
            }
            producer.flush();
        }
        StreamAggregator failing = new StreamAggregator(new KafkaClients(config), new StreamMetrics(new FailingCounters()),
                partials, 0);
        Thread thread = new Thread(failing, "test-aggregator");
        thread.start();
        thread.join(Duration.ofSeconds(60).toMillis());
        assertThat(thread.isAlive()).isFalse();
        assertThat(failing.status().failure()).hasMessage("counter failed on purpose");

        LatestReports latest = new LatestReports();
        try (Monitor monitor = Monitor.start(config, new SimpleMeterRegistry(), latest)) {
            await().atMost(Duration.ofSeconds(30)).until(() -> latest.get("s1", "cumulative").isPresent()
                    && latest.get("s1", "cumulative").get().report().pooled().total() >= 200);
            Thread.sleep(1_000); // room for a double count to show
            assertThat(latest.get("s1", "cumulative").get().report().pooled().total()).isEqualTo(200);
            assertThat(monitor.liveness().get("status")).isEqualTo("ok");
        }
    }

    /** A registry whose counters throw when counted: an unexpected error inside a poll's processing. */
    private static final class FailingCounters extends SimpleMeterRegistry {
        @Override
        protected Counter newCounter(Meter.Id id) {
            return new Counter() {
                @Override
                public void increment(double amount) {
                    throw new IllegalArgumentException("counter failed on purpose");
                }

                @Override
                public double count() {
                    return 0;
                }

                @Override
                public Meter.Id getId() {
                    return id;
                }
            };
        }
    }
}
