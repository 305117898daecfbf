package dev.bracket.bench;

import com.fasterxml.jackson.databind.ObjectMapper;
import dev.bracket.broker.EmbeddedBroker;
import dev.bracket.config.BracketConfig;
import dev.bracket.stream.transaction.KafkaClients;
import dev.bracket.stream.transaction.PartialsCodec;
import dev.bracket.app.TopicSetup;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.admin.ConsumerGroupDescription;
import org.apache.kafka.clients.admin.MemberDescription;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.consumer.ConsumerRecord;
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
import java.util.HashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicBoolean;

/**
 * How long a study goes without bound documents when the instance that owns it goes away. Two
 * {@code bracket monitor} child JVMs of one group run against a broker in this JVM while events
 * stream in (about 5,000 per second); each round finds the owner of study "checkout" (the
 * member of the updater group holding its partials partition), stops it — SIGKILL in odd rounds,
 * SIGTERM (graceful: it leaves the group) in even ones — and times from the signal to the first
 * "checkout" document published by another instance. A fresh instance replaces the stopped one
 * before the next round. A crash costs about {@code session.timeout.ms} (SESSION) plus the new
 * owner's reading of the partials partition plus one publish interval (the new owner waits one
 * before its first document). Prints figures; judges nothing; {@code bench/run failover}.
 *
 * <pre>
 * FailoverBenchmark [RUNS] [SESSION_MS]
 * </pre>
 */
public final class FailoverBenchmark {

    private static final String TOPIC = "fo-events";
    private static final String STUDY = "checkout";
    private static final ObjectMapper JSON = new ObjectMapper();

    private FailoverBenchmark() {
    }

    public static void main(String[] args) throws Exception {
        int runs = args.length > 0 ? Integer.parseInt(args[0]) : 4;
        int sessionMs = args.length > 1 ? Integer.parseInt(args[1]) : 10_000;
        Path dir = Files.createTempDirectory("bracket-failover-bench");
        AtomicBoolean producing = new AtomicBoolean(true);
        try (EmbeddedBroker broker = EmbeddedBroker.start(dir.resolve("kafka"), 0)) {
            String yaml = BenchEvents.STUDIES + """
                    inputs:
                      - topic: %s
                    topics: {rejected: fo-rejected, partials: fo-partials, bounds: fo-bounds, partitions: 3}
                    alerts: {topic: fo-alerts}
                    commit-interval: 200ms
                    publish-interval: 500ms
                    group: fo
                    instance: INSTANCE
                    kafka:
                      bootstrap.servers: %s
                      session.timeout.ms: %d
                      heartbeat.interval.ms: %d
                    """.formatted(TOPIC, broker.bootstrapServers(), sessionMs, Math.max(500, sessionMs / 5));
            BracketConfig config = BracketConfig.parse("failover.yaml", yaml);
            try (Admin admin = new KafkaClients(config).admin()) {
                TopicSetup.ensureTopics(admin, config);
            }
            int partition = PartialsCodec.partitionFor(STUDY, 3);
            Thread producer = new Thread(() -> produce(broker, producing), "fo-producer");
            producer.start();
            Map<String, Process> children = new HashMap<>();
            int started = 0;
            try (Admin admin = Admin.create(Map.of("bootstrap.servers", broker.bootstrapServers()));
                 KafkaConsumer<byte[], byte[]> bounds = boundsReader(broker)) {
                for (; started < 2; started++) {
                    children.put("fo-" + started, child(dir, yaml, "fo-" + started));
                }
                System.out.printf(Locale.ROOT, "2 monitor instances (child JVMs), session.timeout.ms %d, publish-interval 500 ms, about 5,000 events/s%n", sessionMs);
                double[] crash = new double[(runs + 1) / 2];
                double[] graceful = new double[runs / 2];
                for (int r = 0; r < runs; r++) {
                    String owner = awaitOwner(admin, partition, children.size());
                    awaitDocument(bounds, System.currentTimeMillis(), false); // the study is being published
                    boolean kill = r % 2 == 0;
                    Process p = children.remove(owner);
                    long signalled = System.currentTimeMillis();
                    if (kill) {
                        p.destroyForcibly();
                    } else {
                        p.destroy();
                    }
                    long next = awaitDocument(bounds, signalled, true);
                    double seconds = (next - signalled) / 1000.0;
                    if (kill) {
                        crash[r / 2] = seconds;
                    } else {
                        graceful[r / 2] = seconds;
                    }
                    System.out.printf(Locale.ROOT, "round %d: %s of %s (owner of %s): next document of %s after %.2f s%n",
                            r + 1, kill ? "SIGKILL" : "SIGTERM", owner, STUDY, STUDY, seconds);
                    p.waitFor(60, TimeUnit.SECONDS);
                    children.put("fo-" + started, child(dir, yaml, "fo-" + started));
                    started++;
                }
                System.out.println("median (min-max):");
                System.out.println("  after SIGKILL  " + Stats.summary(crash, "%.2f") + " s");
                if (graceful.length > 0) {
                    System.out.println("  after SIGTERM  " + Stats.summary(graceful, "%.2f") + " s");
                }
            } finally {
                children.values().forEach(Process::destroyForcibly);
                producing.set(false);
                producer.join(10_000);
            }
        } finally {
            Stats.deleteQuietly(dir);
        }
    }

    private static Process child(Path dir, String yaml, String instance) throws Exception {
        Path config = dir.resolve(instance + ".yaml");
        Files.writeString(config, yaml.replace("INSTANCE", instance));
        String java = Path.of(System.getProperty("java.home"), "bin", "java").toString();
        return new ProcessBuilder(java, "-Xmx384m", "-cp", System.getProperty("java.class.path"), "dev.bracket.cli.BracketCommand",
                "monitor", "--config", config.toString(), "--http-port", "0")
                .redirectErrorStream(true)
                .redirectOutput(dir.resolve(instance + ".log").toFile())
                .start();
    }

    /** The instance whose updater holds {@code partition}, once the group has {@code members} members. */
    private static String awaitOwner(Admin admin, int partition, int members) throws Exception {
        Deadline deadline = Deadline.in(Duration.ofMinutes(2), "the updater group to settle with " + members + " members");
        while (true) {
            deadline.check();
            try {
                ConsumerGroupDescription g = admin.describeConsumerGroups(List.of("fo-updaters")).all().get(10, TimeUnit.SECONDS).get("fo-updaters");
                if (g.members().size() == members) {
                    for (MemberDescription m : g.members()) {
                        if (m.assignment().topicPartitions().contains(new TopicPartition("fo-partials", partition))) {
                            return m.clientId().substring("bracket-updater-".length());
                        }
                    }
                }
            } catch (java.util.concurrent.ExecutionException e) {
                // the group does not exist yet
            }
            Thread.sleep(200);
        }
    }

    private static KafkaConsumer<byte[], byte[]> boundsReader(EmbeddedBroker broker) {
        KafkaConsumer<byte[], byte[]> c = new KafkaConsumer<>(Map.of(
                ConsumerConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers(),
                ConsumerConfig.ENABLE_AUTO_COMMIT_CONFIG, false),
                new ByteArrayDeserializer(), new ByteArrayDeserializer());
        List<TopicPartition> tps = List.of(new TopicPartition("fo-bounds", 0), new TopicPartition("fo-bounds", 1), new TopicPartition("fo-bounds", 2));
        c.assign(tps);
        c.seekToEnd(tps);
        return c;
    }

    /**
     * Record time of the first {@code checkout/cumulative} document stamped after {@code after};
     * with {@code newOwner}, only a first document of its publisher (revision 1: revisions count
     * per owner), so a last document of a stopping owner does not count.
     */
    private static long awaitDocument(KafkaConsumer<byte[], byte[]> bounds, long after, boolean newOwner) throws Exception {
        Deadline deadline = Deadline.in(Duration.ofMinutes(3), "a document of " + STUDY);
        byte[] key = (STUDY + "/cumulative").getBytes(StandardCharsets.UTF_8);
        while (true) {
            deadline.check();
            for (ConsumerRecord<byte[], byte[]> r : bounds.poll(Duration.ofMillis(100))) {
                if (java.util.Arrays.equals(r.key(), key) && r.timestamp() > after
                        && (!newOwner || JSON.readTree(r.value()).get("revision").asLong() == 1)) {
                    return r.timestamp();
                }
            }
        }
    }

    private static void produce(EmbeddedBroker broker, AtomicBoolean running) {
        BenchEvents gen = new BenchEvents(3);
        byte[][] key = new byte[1][];
        try (KafkaProducer<byte[], byte[]> producer = new KafkaProducer<>(Map.of(
                ProducerConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers(),
                ProducerConfig.LINGER_MS_CONFIG, 20), new ByteArraySerializer(), new ByteArraySerializer())) {
            for (long i = 0; running.get(); i++) {
                producer.send(new ProducerRecord<>(TOPIC, null, System.currentTimeMillis(), null, gen.next(i, key)));
                if (i % 500 == 499) {
                    Thread.sleep(100); // pacing: about 5,000 events per second
                }
            }
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
    }
}
