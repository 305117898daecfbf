package dev.bracket.stream;

import dev.bracket.app.TopicSetup;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.stream.ingest.PaneKey;
import dev.bracket.stream.ingest.SourcePartition;
import dev.bracket.stream.ingest.SourceProgress;
import dev.bracket.stream.ingest.StudyTraffic;
import dev.bracket.stream.transaction.PartialsCodec;
import dev.bracket.stream.transaction.KafkaClients;
import dev.bracket.stream.transaction.StreamAggregator;
import dev.bracket.stream.transaction.StreamMetrics;
import dev.bracket.broker.BrokerPerClass;
import dev.bracket.config.BracketConfig;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.serialization.ByteArraySerializer;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.RegisterExtension;

import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.concurrent.atomic.AtomicReference;

import static org.assertj.core.api.Assertions.assertThat;
import static org.awaitility.Awaitility.await;

/**
 * Every count users see counts each input record once, as committed: while events stream in, the
 * aggregation member's transactions are made to abort on purpose — a second producer with the
 * member's transactional id fences it (what a zombie instance meets), so its open transaction is
 * aborted and its input read again — and afterwards the meters (accepted, rejected by reason,
 * late) and the per-study counts committed for the data-quality rule (in the progress record the
 * studies' owner reads) equal the numbers of events produced, counted here from the generated list.
 */
class CountsAfterForcedAbortsTest {

    @RegisterExtension
    static final BrokerPerClass KAFKA = new BrokerPerClass();

    @Test
    @DisplayName("counts equal the true numbers after forced aborts: meters, late counts and data-quality counts count each record once")
    void countsAreExactAfterForcedAborts() throws Exception {
        BracketConfig config = BracketConfig.parse("aborts.yaml", """
                studies:
                  - id: checkout
                    outcome: {min: 0, max: 1}
                    assume: [[worst-case]]
                  - id: registry
                    outcome: {min: -5, max: 5}
                    assume: [[worst-case]]
                inputs:
                  - topic: aborts-events
                topics: {rejected: aborts-rejected, partials: aborts-partials, bounds: aborts-bounds, partitions: 1}
                windows:
                  - {name: hourly, kind: tumbling, size: 1h}
                commit-interval: 200ms
                publish-interval: 1s
                max-event-bytes: 1024
                group: aborts
                instance: aborts-1
                kafka:
                  bootstrap.servers: %s
                """.formatted(KAFKA.bootstrapServers()));
        KafkaClients clients = new KafkaClients(config);
        int partials;
        try (var admin = clients.admin()) {
            partials = TopicSetup.ensureTopics(admin, config);
        }
        List<TestEvents.Event> events = new ArrayList<>(TestEvents.stream(12_000, 25, 41));
        List<TestEvents.Event> late = TestEvents.late(300, 42);
        events.addAll(2_000, late); // after the stream time has passed them by a day: late for the hourly window

        // The truth, from the list itself.
        long usable = events.stream().filter(TestEvents.Event::usable).count();
        Map<String, Long> rejectedByReason = new java.util.HashMap<>();
        events.stream().filter(e -> !e.usable()).forEach(e -> rejectedByReason.merge(e.rejectReason(), 1L, Long::sum));
        long rejected = events.size() - usable;
        long checkoutAccepted = events.stream().filter(e -> e.usable() && e.study().equals("checkout")).count();
        long registryAccepted = usable - checkoutAccepted;
        // Rejected events naming study "checkout" (TestEvents' bad events all do, except the
        // unreadable, too large and unknown-study ones, which name no configured study).
        long checkoutRejected = rejectedByReason.getOrDefault("missing-field", 0L) + rejectedByReason.getOrDefault("wrong-type", 0L)
                + rejectedByReason.getOrDefault("out-of-range", 0L);
        long unattributed = rejected - checkoutRejected;

        SimpleMeterRegistry registry = new SimpleMeterRegistry();
        StreamMetrics metrics = new StreamMetrics(registry);
        StreamAggregator aggregator = new StreamAggregator(clients, metrics, partials, 0);
        Thread thread = new Thread(aggregator, "test-aggregator");
        thread.start();
        AtomicReference<Throwable> producerFailure = new AtomicReference<>();
        // About 1,500 per second (8 s), so that many fences fall while records are being counted.
        List<ProducerRecord<byte[], byte[]>> records = events.stream()
                .map(e -> new ProducerRecord<>("aborts-events", e.key(), e.value())).toList();
        Thread producing = new Thread(() -> KafkaTestSupport.producePaced(KAFKA.broker(), records, 1_500, producerFailure),
                "test-producer");
        try {
            producing.start();
            // Fence the member again and again while the events stream in.
            while (producing.isAlive()) {
                Thread.sleep(300); // spacing the fences, not waiting for a condition
                fence(config, clients.transactionalId(0));
            }
            producing.join();
            assertThat(producerFailure.get()).isNull();
            await().atMost(Duration.ofSeconds(60)).until(() ->
                    metrics.total("bracket.events", "result", "accepted") + metrics.total("bracket.events", "result", "rejected")
                            >= events.size());
            Thread.sleep(1_500); // room for a double count to show: several more commit intervals

            assertThat(metrics.total("bracket.transactions", "result", "aborted")).as("transactions aborted on purpose")
                    .isGreaterThanOrEqualTo(3);
            assertThat(metrics.total("bracket.events", "result", "accepted")).isEqualTo(usable);
            assertThat(metrics.total("bracket.events", "result", "rejected")).isEqualTo(rejected);
            rejectedByReason.forEach((reason, n) ->
                    assertThat(metrics.total("bracket.events.rejected", "reason", reason)).as(reason).isEqualTo(n));
            assertThat(metrics.total("bracket.events.late", "window", "hourly")).isEqualTo(late.size());
            // The data-quality counts: what the studies' owner reads from the committed progress record.
            SourceProgress committed = committedProgress("aborts-partials");
            assertThat(committed.traffic().get("checkout")).isEqualTo(new StudyTraffic(checkoutAccepted, checkoutRejected,
                    rejectedByReason.getOrDefault("out-of-range", 0L)));
            assertThat(committed.traffic().get("registry")).isEqualTo(new StudyTraffic(registryAccepted, 0, 0));
            assertThat(committed.unattributed()).isEqualTo(unattributed);
        } finally {
            producing.interrupt();
            aggregator.close(Duration.ofSeconds(30));
        }
        assertThat(aggregator.status().failure()).isNull();
    }

    /** The newest committed progress record of the one input partition, as a read_committed reader (the studies' owner) sees it. */
    private static SourceProgress committedProgress(String partialsTopic) {
        AtomicReference<SourceProgress> last = new AtomicReference<>();
        PartialsCodec.Sink sink = new PartialsCodec.Sink() {
            @Override
            public void pane(SourcePartition source, PaneKey key, ObservedArms arms) {
            }

            @Override
            public void progress(SourcePartition source, SourceProgress progress) {
                last.set(progress);
            }
        };
        KafkaTestSupport.readAll(KAFKA.broker(), partialsTopic).forEach(r -> PartialsCodec.decode(r.key(), r.value(), sink));
        assertThat(last.get()).as("a committed progress record").isNotNull();
        return last.get();
    }

    /** Starts a producer with the member's transactional id: the broker aborts the member's open transaction and fences it. */
    private static void fence(BracketConfig config, String transactionalId) {
        try (KafkaProducer<byte[], byte[]> zombie = new KafkaProducer<>(Map.of(
                ProducerConfig.BOOTSTRAP_SERVERS_CONFIG, config.kafka().get("bootstrap.servers"),
                ProducerConfig.TRANSACTIONAL_ID_CONFIG, transactionalId),
                new ByteArraySerializer(), new ByteArraySerializer())) {
            zombie.initTransactions();
        }
    }
}
