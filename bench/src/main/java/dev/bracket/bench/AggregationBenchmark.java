package dev.bracket.bench;

import com.fasterxml.jackson.core.JsonFactory;
import com.fasterxml.jackson.core.JsonParser;
import dev.bracket.broker.EmbeddedBroker;
import dev.bracket.config.BracketConfig;
import dev.bracket.report.store.LatestReports;
import dev.bracket.stream.transaction.KafkaClients;
import dev.bracket.app.Monitor;
import dev.bracket.app.TopicSetup;
import io.micrometer.core.instrument.Measurement;
import io.micrometer.core.instrument.Meter;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.clients.consumer.OffsetAndMetadata;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.serialization.ByteArrayDeserializer;
import org.apache.kafka.common.serialization.ByteArraySerializer;

import java.io.IOException;
import java.lang.management.ManagementFactory;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.HashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Objects;
import java.util.concurrent.TimeUnit;

/**
 * Throughput of the aggregation stage against its two reference points, all reading the same
 * topic (EVENTS compact JSON events from {@link BenchEvents}, 3 partitions) of one broker in
 * this JVM, in one run, one after the other: one round that warms the JIT and is not counted,
 * then RUNS rounds of
 *
 * <ol>
 *   <li><b>bare</b>: a consumer (default settings) that polls every record and touches its
 *       length, nothing else: what one consumer thread can take from this broker at all;</li>
 *   <li><b>plain</b>: the same consumer running Jackson's streaming parser over all tokens of
 *       every record, nothing else;</li>
 *   <li><b>streams</b>: {@link StreamsPeer}, the same cell statistics (cumulative and hourly
 *       windows) as a Kafka Streams exactly-once v2 {@code groupByKey().aggregate()} into a
 *       RocksDB store, same commit interval;</li>
 *   <li><b>monitor</b>: Bracket's {@link Monitor} (aggregator with Kafka transactions, bound
 *       updater and alert evaluator running) with its default settings, in a fresh consumer group;</li>
 *   <li><b>monitor x2</b>: the same with {@code group-members: 2}, two aggregation members sharing the
 *       three partitions (on a 2-core machine they also share the cores with the broker).</li>
 * </ol>
 *
 * Events per second = EVENTS / (time from owning the partitions (3, 4, 5) or the first poll (1, 2)
 * until the last event was folded in; for (4, 5) until the last record was handed to the
 * aggregator, whose poll's batch is folded right after). The closing transaction of (2) and (3) follows within one
 * commit interval and is waited for but not timed; then the results are checked (the store's
 * counts or the committed offsets add up to EVENTS, else the harness stops with an error). The
 * targets are monitor/plain at least 0.8 and monitor/streams at least 2.5, both ratios taken
 * within one round; the summary gives their median and range over the rounds. Prints figures,
 * judges nothing; not part of the test suite ({@code bench/run} runs it).
 *
 * <pre>
 * AggregationBenchmark [EVENTS] [RUNS] [all|bare-monitor|bare|plain|streams|monitor|monitor2]
 * </pre>
 *
 * {@code bare-monitor} runs only (1) and (4), alternately, with their ratios. Beside the rates it
 * prints the CPU time per event of the consuming thread (the polling thread of (1), the
 * aggregator of (4)): on a machine shared with other work the rates move with the neighbours,
 * the CPU time per event much less.
 */
public final class AggregationBenchmark {

    private static final String TOPIC = "bench-events";
    private static final JsonFactory JSON = new JsonFactory();
    /** CPU use during the last contender's measured interval. */
    private static String cpuNote = "";
    /** CPU time per event of the last contender's consuming thread (bare, plain: the polling thread; monitor: its aggregator). */
    private static double threadNanosPerEvent;

    private AggregationBenchmark() {
    }

    public static void main(String[] args) throws Exception {
        int events = args.length > 0 ? Integer.parseInt(args[0]) : 1_000_000;
        int runs = args.length > 1 ? Integer.parseInt(args[1]) : 5;
        // For profiling one contender alone: "monitor", "streams" or "plain" (no ratios then).
        String only = args.length > 2 ? args[2] : "all";
        Path dir = Files.createTempDirectory("bracket-bench");
        try (EmbeddedBroker broker = EmbeddedBroker.start(dir.resolve("kafka"), 0)) {
            BracketConfig base = config(broker, "bench-setup");
            try (Admin admin = new KafkaClients(base).admin()) {
                TopicSetup.ensureTopics(admin, base);
            }
            long bytes = produce(broker, events);
            System.out.printf(Locale.ROOT, "%,d events on '%s', %.0f bytes of JSON each on average, 3 partitions; commit interval %d ms%n",
                    events, TOPIC, (double) bytes / events, base.commitInterval().toMillis());
            double[] bare = new double[runs];
            double[] plain = new double[runs];
            double[] streams = new double[runs];
            double[] monitor = new double[runs];
            double[] monitor2 = new double[runs];
            double[] vsBare = new double[runs];
            double[] vsPlain = new double[runs];
            double[] vsStreams = new double[runs];
            double[] bareCpu = new double[runs];
            double[] monitorCpu = new double[runs];
            if (!only.equals("all") && !only.equals("bare-monitor")) {
                for (int r = 0; r < runs; r++) {
                    double rate = switch (only) {
                        case "bare" -> plainConsumer(broker, events, false);
                        case "plain" -> plainConsumer(broker, events, true);
                        case "streams" -> streamsPeer(broker, events, "bench-streams-" + r, dir.resolve("streams-" + r));
                        case "monitor" -> monitor(broker, events, "bench-monitor-" + r, 1);
                        case "monitor2" -> monitor(broker, events, "bench-monitor2-" + r, 2);
                        default -> throw new IllegalArgumentException("unknown contender " + only);
                    };
                    System.out.printf(Locale.ROOT, "run %d: %s %,.0f events/s (%s)%n", r + 1, only, rate, cpuNote);
                }
                return;
            }
            boolean all = only.equals("all"); // else only bare and monitor
            double warmBare = plainConsumer(broker, events, false);
            double warmPlain = all ? plainConsumer(broker, events, true) : Double.NaN;
            double warmStreams = all ? streamsPeer(broker, events, "bench-streams-warm", dir.resolve("streams-warm")) : Double.NaN;
            double warmMonitor = monitor(broker, events, "bench-monitor-warm", 1);
            System.out.printf(Locale.ROOT, "warm-up (not counted): bare %,.0f/s; plain %,.0f/s; Kafka Streams %,.0f/s; monitor %,.0f/s%n",
                    warmBare, warmPlain, warmStreams, warmMonitor);
            for (int r = 0; r < runs; r++) {
                bare[r] = plainConsumer(broker, events, false);
                bareCpu[r] = threadNanosPerEvent;
                plain[r] = all ? plainConsumer(broker, events, true) : Double.NaN;
                streams[r] = all ? streamsPeer(broker, events, "bench-streams-" + r, dir.resolve("streams-" + r)) : Double.NaN;
                monitor[r] = monitor(broker, events, "bench-monitor-" + r, 1);
                monitorCpu[r] = threadNanosPerEvent;
                vsBare[r] = monitor[r] / bare[r];
                vsPlain[r] = monitor[r] / plain[r];
                vsStreams[r] = monitor[r] / streams[r];
                System.out.printf(Locale.ROOT, "run %d: bare consumer %,.0f events/s; plain consumer + parse %,.0f/s; Kafka Streams EOS %,.0f/s;"
                        + " monitor %,.0f/s; monitor/bare %.2f, monitor/plain %.2f, monitor/streams %.2f%n",
                        r + 1, bare[r], plain[r], streams[r], monitor[r], vsBare[r], vsPlain[r], vsStreams[r]);
                System.out.printf(Locale.ROOT, "  consuming thread's CPU per event: bare %.0f ns, monitor's aggregator %.0f ns%n", bareCpu[r], monitorCpu[r]);
                System.out.printf(Locale.ROOT, "  monitor's aggregator: %s; machine load average %.1f (this benchmark alone keeps it near 2; well above, other work shared the cores)%n",
                        cpuNote, ManagementFactory.getOperatingSystemMXBean().getSystemLoadAverage());
                if (all) {
                    monitor2[r] = monitor(broker, events, "bench-monitor2-" + r, 2);
                    System.out.printf(Locale.ROOT, "  monitor with 2 aggregation members %,.0f events/s (%.2f x one member)%n", monitor2[r], monitor2[r] / monitor[r]);
                }
            }
            System.out.println("over " + runs + " runs, median (min-max):");
            System.out.println("  bare consumer           " + Stats.summary(bare, "%,.0f") + " events/s");
            System.out.println("  Bracket monitor         " + Stats.summary(monitor, "%,.0f") + " events/s");
            System.out.println("  monitor / bare          " + Stats.summary(vsBare, "%.2f") + "   (target >= 0.75: the share of one thread's reading limit)");
            System.out.println("  thread CPU per event    bare " + Stats.summary(bareCpu, "%.0f") + " ns, monitor's aggregator " + Stats.summary(monitorCpu, "%.0f") + " ns");
            if (all) {
                System.out.println("  plain consumer + parse  " + Stats.summary(plain, "%,.0f") + " events/s");
                System.out.println("  Kafka Streams EOS       " + Stats.summary(streams, "%,.0f") + " events/s");
                System.out.println("  monitor, 2 members      " + Stats.summary(monitor2, "%,.0f") + " events/s");
                System.out.println("  monitor / plain         " + Stats.summary(vsPlain, "%.2f") + "   (target >= 0.80)");
                System.out.println("  monitor / streams       " + Stats.summary(vsStreams, "%.2f") + "   (target >= 2.50)");
            }
        } finally {
            Stats.deleteQuietly(dir);
        }
    }

    private static BracketConfig config(EmbeddedBroker broker, String group) {
        return config(broker, group, 1);
    }

    private static BracketConfig config(EmbeddedBroker broker, String group, int members) {
        return BracketConfig.parse("bench.yaml", BenchEvents.STUDIES + """
                inputs:
                  - topic: %s
                topics: {rejected: bench-rejected, partials: %s-partials, bounds: %s-bounds, partitions: 3}
                alerts: {topic: %s-alerts}
                windows:
                  - {name: hourly, kind: tumbling, size: 1h}
                group-members: %d
                group: %s
                instance: %s
                kafka:
                  bootstrap.servers: %s
                """.formatted(TOPIC, group, group, group, members, group, group, broker.bootstrapServers()));
    }

    private static long produce(EmbeddedBroker broker, int events) {
        long bytes = 0;
        BenchEvents gen = new BenchEvents(1);
        byte[][] key = new byte[1][];
        try (KafkaProducer<byte[], byte[]> producer = new KafkaProducer<>(Map.of(
                ProducerConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers(),
                ProducerConfig.LINGER_MS_CONFIG, 20,
                ProducerConfig.BATCH_SIZE_CONFIG, 256 * 1024),
                new ByteArraySerializer(), new ByteArraySerializer())) {
            for (long i = 0; i < events; i++) {
                byte[] value = gen.next(i, key);
                producer.send(new ProducerRecord<>(TOPIC, key[0], value));
                bytes += value.length;
            }
            producer.flush();
        }
        return bytes;
    }

    /** References (1) and (2): poll every record and touch its length, or run the streaming parser over all its tokens. */
    private static double plainConsumer(EmbeddedBroker broker, int events, boolean parse) throws IOException {
        try (KafkaConsumer<byte[], byte[]> c = new KafkaConsumer<>(Map.of(
                ConsumerConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers(),
                ConsumerConfig.ENABLE_AUTO_COMMIT_CONFIG, false),
                new ByteArrayDeserializer(), new ByteArrayDeserializer())) {
            List<TopicPartition> tps = List.of(new TopicPartition(TOPIC, 0), new TopicPartition(TOPIC, 1), new TopicPartition(TOPIC, 2));
            c.assign(tps);
            c.seekToBeginning(tps);
            CpuUse cpu = CpuUse.start(Thread.currentThread().getName()::equals);
            long start = System.nanoTime();
            long seen = 0;
            long tokens = 0;
            Deadline deadline = Deadline.in(processingLimit(events), "the plain consumer to read " + events + " events");
            while (seen < events) {
                deadline.check();
                for (ConsumerRecord<byte[], byte[]> r : c.poll(Duration.ofMillis(100))) {
                    if (parse) {
                        try (JsonParser p = JSON.createParser(r.value())) {
                            while (p.nextToken() != null) {
                                tokens++;
                            }
                        }
                    } else {
                        tokens += r.value().length; // bytes, so the loop cannot be optimised away
                    }
                    seen++;
                }
            }
            double rate = seen / ((System.nanoTime() - start) / 1e9);
            threadNanosPerEvent = cpu.threadNanos() / (double) seen;
            cpuNote = cpu.since() + "; " + cpu.busiest(3);
            if (tokens < 10L * events) {
                throw new IllegalStateException("only " + tokens + " tokens parsed");
            }
            return rate;
        }
    }

    /** Reference (2): the Kafka Streams aggregation in a fresh application. */
    private static double streamsPeer(EmbeddedBroker broker, int events, String applicationId, Path stateDir) throws Exception {
        BracketConfig config = config(broker, applicationId);
        long folds = (long) events * config.windows().size();
        try (StreamsPeer peer = new StreamsPeer(config, TOPIC, applicationId, stateDir)) {
            peer.start();
            peer.awaitRunning(60);
            CpuUse cpu = CpuUse.start(n -> n.startsWith(applicationId + "-") && n.endsWith("-StreamThread-1"));
            long start = System.nanoTime();
            Deadline.await(processingLimit(events), "Kafka Streams to fold " + folds + " (event, window) pairs",
                    () -> peer.folded() >= folds);
            double rate = events / ((System.nanoTime() - start) / 1e9);
            cpuNote = cpu.since();
            TimeUnit.MILLISECONDS.sleep(config.commitInterval().toMillis() * 2);
            long stored = peer.countInStore();
            if (stored != folds) {
                throw new IllegalStateException("Kafka Streams store holds " + stored + " (event, window) pairs, expected " + folds);
            }
            return rate;
        }
    }

    /** Bracket's monitor in a fresh consumer group. */
    private static double monitor(EmbeddedBroker broker, int events, String group, int members) throws Exception {
        BracketConfig config = config(broker, group, members);
        try (Admin admin = new KafkaClients(config).admin();
             Monitor monitor = Monitor.start(config, new SimpleMeterRegistry(), new LatestReports())) {
            Deadline.await(Duration.ofSeconds(60), "the monitor's partition assignment", () -> monitor.assignedPartitions() >= 3);
            CpuUse cpu = CpuUse.start("bracket-aggregator-0"::equals);
            long start = System.nanoTime();
            // Timed until the aggregators' consumers have handed every record to them (Kafka's
            // records-consumed-total); each poll's records are folded right after it returns, so
            // this misses at most one poll's batch. The meters count events only once their
            // transaction commits, up to a commit interval later: timing those would add that wait.
            Deadline.await(processingLimit(events), "the monitor to read " + events + " events", () -> consumed(monitor) >= events);
            double rate = events / ((System.nanoTime() - start) / 1e9);
            threadNanosPerEvent = cpu.threadNanos() / (double) events;
            cpuNote = cpu.since() + "; " + cpu.busiest(3);
            Deadline.await(Duration.ofSeconds(30), "the monitor to accept and commit all " + events + " events",
                    () -> monitor.metrics().total("bracket.events", "result", "accepted") >= events && committed(admin, group) >= events);
            return rate;
        }
    }

    /**
     * Records the aggregators' consumers have returned from poll, by Kafka's records-consumed-total
     * as bound to the monitor's registry: per consumer (its tags besides the topic) the largest of its client-level
     * and per-topic meters (one input topic, so they agree; which of them is bound depends on
     * when the binder last looked), summed over the consumers.
     */
    private static long consumed(Monitor monitor) {
        Map<String, Double> byClient = new HashMap<>();
        for (Meter m : monitor.metrics().registry().find("kafka.consumer.fetch.manager.records.consumed.total").meters()) {
            for (Measurement v : m.measure()) {
                String client = m.getId().getTags().stream().filter(t -> !t.getKey().equals("topic")).toList().toString();
                byClient.merge(client, v.getValue(), Math::max);
            }
        }
        return (long) byClient.values().stream().mapToDouble(Double::doubleValue).sum();
    }

    /** Time allowed for one contender to process the events: a minute plus 0.1 ms per event (10,000 events/s). */
    private static Duration processingLimit(int events) {
        return Duration.ofSeconds(60).plusNanos(100_000L * events);
    }

    private static long committed(Admin admin, String group) throws Exception {
        return admin.listConsumerGroupOffsets(group).partitionsToOffsetAndMetadata().get(10, TimeUnit.SECONDS)
                .values().stream().filter(Objects::nonNull).mapToLong(OffsetAndMetadata::offset).sum();
    }
}
