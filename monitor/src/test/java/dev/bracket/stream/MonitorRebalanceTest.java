package dev.bracket.stream;

import dev.bracket.stream.transaction.KafkaClients;
import dev.bracket.app.TopicSetup;
import dev.bracket.app.Monitor;
import dev.bracket.broker.BrokerPerClass;
import dev.bracket.config.BracketConfig;
import dev.bracket.report.store.LatestReports;
import dev.bracket.report.store.PublishedReport;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.RegisterExtension;

import java.time.Duration;
import java.util.List;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicInteger;

import static org.assertj.core.api.Assertions.assertThat;
import static org.awaitility.Awaitility.await;

/**
 * Two instances of one consumer group share the input partitions: the second (running two
 * aggregation members) joins while events stream, then the first leaves; the partitions move with their statistics and the final counts
 * are exact.
 */
class MonitorRebalanceTest {

    @RegisterExtension
    static final BrokerPerClass KAFKA = new BrokerPerClass();

    private static BracketConfig config(String instance, int threads) {
        return BracketConfig.parse(instance + ".yaml", """
                studies:
                  - id: checkout
                    outcome: {min: 0, max: 1, better: lower}
                    assume: [[worst-case]]
                  - id: registry
                    outcome: {min: -5, max: 5}
                    assume: [[worst-case]]
                inputs:
                  - topic: rb-events
                topics: {rejected: rb-rejected, partials: rb-partials, bounds: rb-bounds, partitions: 4}
                commit-interval: 200ms
                publish-interval: 200ms
                max-event-bytes: 1024
                group-members: %d
                group: rb
                instance: %s
                kafka:
                  bootstrap.servers: %s
                """.formatted(threads, instance, KAFKA.bootstrapServers()));
    }

    @Test
    @DisplayName("an instance joining and another leaving mid-stream keep counts exact")
    void joinAndLeaveKeepCountsExact() throws Exception {
        List<TestEvents.Event> events = TestEvents.stream(60_000, 0, 31);
        long checkout = events.stream().filter(e -> e.study().equals("checkout")).count();
        long registry = events.size() - checkout;
        try (Admin admin = new KafkaClients(config("a", 1)).admin()) {
            TopicSetup.ensureTopics(admin, config("a", 1));
        }
        AtomicInteger sent = new AtomicInteger();
        Thread producing = new Thread(() -> {
            try (KafkaProducer<byte[], byte[]> producer = KafkaTestSupport.producer(KAFKA.broker())) {
                long start = System.nanoTime();
                for (TestEvents.Event e : events) {
                    producer.send(new ProducerRecord<>("rb-events", e.key(), e.value()));
                    int n = sent.incrementAndGet();
                    if (n % 500 == 0) {
                        long wait = start + n * 200_000L - System.nanoTime(); // 5,000 per second
                        if (wait > 0) {
                            TimeUnit.NANOSECONDS.sleep(wait); // pacing the producer, not waiting for a condition
                        }
                    }
                }
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
            }
        }, "test-producer");

        LatestReports reportsB = new LatestReports();
        Monitor a = Monitor.start(config("a", 1), new SimpleMeterRegistry(), new LatestReports());
        Monitor b = null;
        try {
            producing.start();
            await().atMost(Duration.ofSeconds(60)).until(() -> a.assignedPartitions() == 4 && sent.get() >= 15_000);
            b = Monitor.start(config("b", 2), new SimpleMeterRegistry(), reportsB);
            Monitor joined = b;
            // Cooperative rebalance: b takes over some of a's partitions, with their statistics.
            await().atMost(Duration.ofSeconds(60)).until(() -> joined.assignedPartitions() > 0 && a.assignedPartitions() > 0
                    && joined.assignedPartitions() + a.assignedPartitions() == 4);
            await().atMost(Duration.ofSeconds(60)).until(() -> sent.get() >= 35_000);
            assertThat(sent.get()).as("a leaves while events still stream").isLessThan(events.size());
            a.close();
            await().atMost(Duration.ofSeconds(60)).until(() -> joined.assignedPartitions() == 4);
            producing.join(Duration.ofMinutes(2).toMillis());
            assertThat(sent.get()).isEqualTo(events.size());

            await().atMost(Duration.ofSeconds(120)).untilAsserted(() -> {
                assertThat(reportsB.get("checkout", "cumulative")).get().extracting(r -> r.report().pooled().total()).isEqualTo(checkout);
                assertThat(reportsB.get("registry", "cumulative")).get().extracting(r -> r.report().pooled().total()).isEqualTo(registry);
            });
            PublishedReport last = reportsB.get("checkout", "cumulative").orElseThrow();
            long treated = events.stream().filter(e -> e.study().equals("checkout") && e.treated()).count();
            assertThat(last.report().pooled().treated().count()).isEqualTo(treated);
            assertThat(b.metrics().total("bracket.partitions.restored")).as("partitions restored on b").isGreaterThanOrEqualTo(4);
        } finally {
            a.close();
            if (b != null) {
                b.close();
            }
            producing.interrupt();
        }
    }
}
