package dev.bracket.stream;

import com.fasterxml.jackson.core.JsonFactory;
import com.fasterxml.jackson.core.JsonParser;
import dev.bracket.broker.EmbeddedBroker;
import dev.bracket.config.BracketConfig;
import dev.bracket.report.LatestReports;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.clients.consumer.OffsetAndMetadata;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.serialization.ByteArrayDeserializer;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.concurrent.TimeUnit;

/**
 * Throughput of the aggregation stage against the baseline it must reach (at least 0.8 times a
 * plain consumer that only parses each record with Jackson's streaming parser), on the same
 * topic of a broker in this JVM. Prints figures; asserts nothing. Not part of the test suite.
 *
 * <pre>
 * mvn -q -DskipTests package   # builds monitor/target/bracket.jar and the test classes
 * java -cp monitor/target/test-classes:monitor/target/bracket.jar dev.bracket.stream.AggregationBenchmark [EVENTS] [RUNS]
 * </pre>
 */
public final class AggregationBenchmark {

    private static final String TOPIC = "bench-events";
    private static final JsonFactory JSON = new JsonFactory();

    private AggregationBenchmark() {
    }

    public static void main(String[] args) throws Exception {
        int events = args.length > 0 ? Integer.parseInt(args[0]) : 1_000_000;
        int runs = args.length > 1 ? Integer.parseInt(args[1]) : 3;
        Path dir = Files.createTempDirectory("bracket-bench");
        try (EmbeddedBroker broker = EmbeddedBroker.start(dir.resolve("kafka"), 0)) {
            BracketConfig base = config(broker, "bench-0");
            try (Admin admin = new KafkaClients(base).admin()) {
                TopicSetup.ensureTopics(admin, base);
            }
            long bytes = produce(broker, events);
            System.out.printf(Locale.ROOT, "%,d events, %.0f bytes each on average, 3 partitions%n", events, (double) bytes / events);
            double[] plain = new double[runs];
            double[] one = new double[runs];
            double[] two = new double[runs];
            for (int r = 0; r < runs; r++) {
                plain[r] = plainConsumerParsing(broker, events);
                one[r] = aggregator(broker, events, "bench-1-" + r, 1);
                two[r] = aggregator(broker, events, "bench-2-" + r, 2);
                System.out.printf(Locale.ROOT, "run %d: plain consumer + parse %,.0f records/s; monitor (exactly-once) threads=1 %,.0f/s, threads=2 %,.0f/s%n",
                        r + 1, plain[r], one[r], two[r]);
            }
            double p = median(plain);
            System.out.printf(Locale.ROOT, "median: plain %,.0f/s; threads=1 %,.0f/s (ratio %.2f); threads=2 %,.0f/s (ratio %.2f); target >= 0.80%n",
                    p, median(one), median(one) / p, median(two), median(two) / p);
        } finally {
            deleteQuietly(dir);
        }
    }

    private static BracketConfig config(EmbeddedBroker broker, String group) {
        return config(broker, group, 1);
    }

    private static BracketConfig config(EmbeddedBroker broker, String group, int threads) {
        return BracketConfig.parse("bench.yaml", """
                studies:
                  - id: checkout
                    outcome: {min: 0, max: 1, better: lower}
                    assume: [[worst-case], [mts-negative]]
                  - id: registry
                    outcome: {min: -5, max: 5}
                    assume: [[worst-case], [mtr-positive]]
                inputs:
                  - topic: %s
                topics: {rejected: bench-rejected, partials: bench-partials, bounds: bench-bounds, partitions: 3}
                windows:
                  - {name: hourly, kind: tumbling, size: 1h}
                commit-interval: 1s
                publish-interval: 1s
                threads: %d
                group: %s
                instance: %s
                kafka:
                  bootstrap.servers: %s
                """.formatted(TOPIC, threads, group, group, broker.bootstrapServers()));
    }

    private static long produce(EmbeddedBroker broker, int events) {
        long bytes = 0;
        try (KafkaProducer<byte[], byte[]> producer = KafkaTestSupport.producer(broker)) {
            for (TestEvents.Event e : TestEvents.stream(events, 0, 1)) {
                producer.send(new ProducerRecord<>(TOPIC, e.key(), e.value()));
                bytes += e.value().length;
            }
            producer.flush();
        }
        return bytes;
    }

    /** The baseline: poll every record and run the streaming parser over all its tokens. */
    private static double plainConsumerParsing(EmbeddedBroker broker, int events) throws IOException {
        try (KafkaConsumer<byte[], byte[]> c = new KafkaConsumer<>(Map.of(
                ConsumerConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers(),
                ConsumerConfig.ENABLE_AUTO_COMMIT_CONFIG, false),
                new ByteArrayDeserializer(), new ByteArrayDeserializer())) {
            List<TopicPartition> tps = List.of(new TopicPartition(TOPIC, 0), new TopicPartition(TOPIC, 1), new TopicPartition(TOPIC, 2));
            c.assign(tps);
            c.seekToBeginning(tps);
            long start = System.nanoTime();
            long seen = 0;
            long tokens = 0;
            while (seen < events) {
                for (ConsumerRecord<byte[], byte[]> r : c.poll(Duration.ofMillis(100))) {
                    try (JsonParser p = JSON.createParser(r.value())) {
                        while (p.nextToken() != null) {
                            tokens++;
                        }
                    }
                    seen++;
                }
            }
            double seconds = (System.nanoTime() - start) / 1e9;
            if (tokens == 0) {
                throw new IllegalStateException("nothing parsed");
            }
            return seen / seconds;
        }
    }

    /**
     * The monitor's aggregator in a fresh group: records per second from owning all partitions to
     * having processed every record (the last commit follows within one commit interval).
     */
    private static double aggregator(EmbeddedBroker broker, int events, String group, int threads) throws Exception {
        BracketConfig config = config(broker, group, threads);
        try (Admin admin = new KafkaClients(config).admin();
             Monitor monitor = Monitor.start(config, new SimpleMeterRegistry(), new LatestReports())) {
            while (monitor.assignedPartitions() < 3) {
                TimeUnit.MILLISECONDS.sleep(5);
            }
            long start = System.nanoTime();
            while (monitor.metrics().total("bracket.events", "result", "accepted") < events) {
                TimeUnit.MILLISECONDS.sleep(5);
            }
            double rate = events / ((System.nanoTime() - start) / 1e9);
            while (committed(admin, group) < events) {
                TimeUnit.MILLISECONDS.sleep(20);
            }
            return rate;
        }
    }

    private static long committed(Admin admin, String group) throws Exception {
        return admin.listConsumerGroupOffsets(group).partitionsToOffsetAndMetadata().get(10, TimeUnit.SECONDS)
                .values().stream().filter(java.util.Objects::nonNull).mapToLong(OffsetAndMetadata::offset).sum();
    }

    private static double median(double[] xs) {
        double[] s = xs.clone();
        Arrays.sort(s);
        return s[s.length / 2];
    }

    private static void deleteQuietly(Path dir) throws IOException {
        List<Path> paths = new ArrayList<>();
        try (var walk = Files.walk(dir)) {
            walk.forEach(paths::add);
        }
        paths.sort((a, b) -> b.getNameCount() - a.getNameCount());
        for (Path p : paths) {
            Files.deleteIfExists(p);
        }
    }
}
