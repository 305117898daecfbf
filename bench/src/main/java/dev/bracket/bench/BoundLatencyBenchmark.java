package dev.bracket.bench;

import dev.bracket.stream.transaction.KafkaClients;
import dev.bracket.app.TopicSetup;
import dev.bracket.app.Monitor;
import com.fasterxml.jackson.databind.JsonNode;
import dev.bracket.broker.EmbeddedBroker;
import dev.bracket.config.BracketConfig;
import dev.bracket.report.store.LatestReports;
import dev.bracket.report.render.ReportJson;
import dev.bracket.stream.transaction.KafkaClients;
import dev.bracket.app.Monitor;
import dev.bracket.app.TopicSetup;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import org.HdrHistogram.Histogram;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.ConsumerRecords;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.serialization.ByteArrayDeserializer;
import org.apache.kafka.common.serialization.ByteArraySerializer;

import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicLongArray;
import java.util.concurrent.locks.LockSupport;

/**
 * Event-to-bounds latency of the monitor at a steady input rate (default 50,000 events/s for
 * 30 s, the first 5 s not recorded), on a broker in this JVM, with the monitor's default
 * commit interval (1 s) and publish interval (0.5 s) unless given.
 *
 * <p><b>Definition.</b> The input has three partitions; study {@code sP} is written only to
 * partition P, so the monitor folds study {@code sP}'s events in the order they were sent. The
 * latency of the k-th event of study {@code sP} is the time from just before its
 * {@code producer.send} (producer: linger 5 ms, acks=all) to the moment a consumer of the bounds
 * topic in this JVM receives the first document for {@code sP} and the cumulative window whose
 * arm counts add up to at least k, i.e. the first published bound that includes the event. Both
 * times are {@link System#nanoTime()} of this JVM. The path measured is therefore: producer
 * batching, broker append, the aggregator's poll, the next transaction commit of the partials,
 * the updater's read_committed fetch, the publish rate limit, the report's computation and its
 * publication on the bounds topic. Prints p50/p90/p99/p99.9/max (HdrHistogram); asserts nothing;
 * not part of the test suite.
 *
 * <pre>
 * BoundLatencyBenchmark [RATE] [SECONDS] [COMMIT_INTERVAL] [PUBLISH_INTERVAL]   e.g. 50000 30 1s 500ms
 * </pre>
 */
public final class BoundLatencyBenchmark {

    private static final String TOPIC = "latency-events";
    private static final int STUDIES = 3;
    private static final long WARMUP_SECONDS = 5;

    private BoundLatencyBenchmark() {
    }

    public static void main(String[] args) throws Exception {
        int rate = args.length > 0 ? Integer.parseInt(args[0]) : 50_000;
        int seconds = args.length > 1 ? Integer.parseInt(args[1]) : 30;
        String commit = args.length > 2 ? args[2] : "1s";
        String publish = args.length > 3 ? args[3] : "500ms";
        Path dir = Files.createTempDirectory("bracket-latency");
        try (EmbeddedBroker broker = EmbeddedBroker.start(dir.resolve("kafka"), 0)) {
            BracketConfig config = config(broker, commit, publish);
            try (Admin admin = new KafkaClients(config).admin()) {
                TopicSetup.ensureTopics(admin, config);
            }
            int perStudy = rate * seconds / STUDIES + 1;
            AtomicLongArray[] sentNanos = new AtomicLongArray[STUDIES];
            for (int s = 0; s < STUDIES; s++) {
                sentNanos[s] = new AtomicLongArray(perStudy + 1);
            }
            Histogram latency = new Histogram(TimeUnit.MINUTES.toMicros(5), 3);
            try (Monitor monitor = Monitor.start(config, new SimpleMeterRegistry(), new LatestReports());
                 KafkaConsumer<byte[], byte[]> bounds = boundsReader(broker, config)) {
                Deadline.await(Duration.ofSeconds(60), "the monitor's partition assignment",
                        () -> monitor.assignedPartitions() >= STUDIES);
                long[] sent = new long[STUDIES];
                Thread producer = new Thread(() -> produce(broker, rate, seconds, sentNanos, sent), "latency-producer");
                long start = System.nanoTime();
                long recordFrom = start + TimeUnit.SECONDS.toNanos(WARMUP_SECONDS);
                producer.start();
                long[] included = new long[STUDIES];
                long deadline = start + TimeUnit.SECONDS.toNanos(seconds + 60L);
                long lastSeen = 0;
                while ((producer.isAlive() || !allIncluded(included, sent)) && System.nanoTime() < deadline) {
                    ConsumerRecords<byte[], byte[]> docs = bounds.poll(Duration.ofMillis(50));
                    long now = System.nanoTime();
                    for (ConsumerRecord<byte[], byte[]> r : docs) {
                        String key = new String(r.key(), StandardCharsets.UTF_8);
                        if (!key.endsWith("/cumulative")) {
                            continue;
                        }
                        int s = key.charAt(1) - '0';
                        JsonNode arms = ReportJson.mapper().readTree(r.value()).get("arms");
                        long n = arms.get("treated").get("n").asLong() + arms.get("control").get("n").asLong();
                        for (long k = included[s] + 1; k <= n; k++) {
                            long sentAt = sentNanos[s].get((int) k);
                            if (sentAt >= recordFrom) {
                                latency.recordValue(Math.max(0, (now - sentAt) / 1_000));
                            }
                        }
                        included[s] = Math.max(included[s], n);
                        lastSeen = now;
                    }
                }
                producer.join();
                long total = sent[0] + sent[1] + sent[2];
                double achieved = total / (double) seconds;
                System.out.printf(Locale.ROOT, "input %,d events/s for %d s (achieved %,.0f/s), commit interval %s, publish interval %s;"
                        + " %,d events recorded (first %d s left out)%n", rate, seconds, achieved, commit, publish,
                        latency.getTotalCount(), WARMUP_SECONDS);
                if (!allIncluded(included, sent)) {
                    System.out.println("WARNING: not every event reached a bound document before the deadline");
                }
                System.out.printf(Locale.ROOT, "event-to-bounds latency ms: p50 %.0f, p90 %.0f, p99 %.0f, p99.9 %.0f, max %.0f%n",
                        ms(latency, 50), ms(latency, 90), ms(latency, 99), ms(latency, 99.9), latency.getMaxValue() / 1e3);
                if (lastSeen == 0) {
                    System.out.println("WARNING: no bound document seen");
                }
            }
        } finally {
            Stats.deleteQuietly(dir);
        }
    }

    private static double ms(Histogram h, double percentile) {
        return h.getValueAtPercentile(percentile) / 1e3;
    }

    private static boolean allIncluded(long[] included, long[] sent) {
        for (int s = 0; s < STUDIES; s++) {
            if (included[s] < sent[s]) {
                return false;
            }
        }
        return true;
    }

    private static BracketConfig config(EmbeddedBroker broker, String commit, String publish) {
        StringBuilder studies = new StringBuilder("studies:\n");
        for (int s = 0; s < STUDIES; s++) {
            studies.append("  - id: s").append(s).append("\n    outcome: {min: 0, max: 1}\n    assume: [[worst-case], [mtr-positive]]\n");
        }
        return BracketConfig.parse("latency.yaml", studies + """
                inputs:
                  - topic: %s
                topics: {rejected: latency-rejected, partials: latency-partials, bounds: latency-bounds, partitions: 3}
                alerts: {topic: latency-alerts}
                commit-interval: %s
                publish-interval: %s
                group: latency
                instance: latency
                kafka:
                  bootstrap.servers: %s
                """.formatted(TOPIC, commit, publish, broker.bootstrapServers()));
    }

    private static KafkaConsumer<byte[], byte[]> boundsReader(EmbeddedBroker broker, BracketConfig config) {
        KafkaConsumer<byte[], byte[]> c = new KafkaConsumer<>(Map.of(
                ConsumerConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers(),
                ConsumerConfig.ENABLE_AUTO_COMMIT_CONFIG, false),
                new ByteArrayDeserializer(), new ByteArrayDeserializer());
        List<TopicPartition> tps = new ArrayList<>();
        c.partitionsFor(config.topics().bounds()).forEach(p -> tps.add(new TopicPartition(p.topic(), p.partition())));
        c.assign(tps);
        c.seekToBeginning(tps);
        return c;
    }

    /**
     * Sends {@code rate} events per second, paced every 0.2 ms, study {@code sP} to partition P;
     * the k-th event of a study (from 1) has its send time at {@code sentNanos[P][k]}.
     */
    private static void produce(EmbeddedBroker broker, int rate, int seconds, AtomicLongArray[] sentNanos, long[] sent) {
        try (KafkaProducer<byte[], byte[]> producer = new KafkaProducer<>(Map.of(
                ProducerConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers(),
                ProducerConfig.LINGER_MS_CONFIG, 5,
                ProducerConfig.ACKS_CONFIG, "all"),
                new ByteArraySerializer(), new ByteArraySerializer())) {
            long start = System.nanoTime();
            long total = (long) rate * seconds;
            long i = 0;
            while (i < total) {
                long due = Math.min(total, (System.nanoTime() - start) * rate / 1_000_000_000L);
                for (; i < due; i++) {
                    int s = (int) (i % STUDIES);
                    long k = ++sent[s];
                    String json = "{\"study\":\"s" + s + "\",\"unit\":\"u" + (i % 10_000) + "\",\"treated\":" + (i % 3 == 0)
                            + ",\"outcome\":" + (i % 7 == 0 ? 1 : 0) + ",\"time\":" + System.currentTimeMillis() + "}";
                    sentNanos[s].set((int) k, System.nanoTime());
                    producer.send(new ProducerRecord<>(TOPIC, s, null, json.getBytes(StandardCharsets.UTF_8)));
                }
                LockSupport.parkNanos(200_000);
            }
            producer.flush();
        }
    }
}
