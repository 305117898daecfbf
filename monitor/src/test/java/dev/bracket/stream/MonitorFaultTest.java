package dev.bracket.stream;

import dev.bracket.app.TopicSetup;

import dev.bracket.stream.transaction.KafkaClients;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.bracket.config.BracketConfig;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.header.Header;
import org.apache.kafka.common.header.internals.RecordHeaders;
import org.apache.kafka.common.serialization.ByteArraySerializer;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

import java.io.IOException;
import java.net.InetAddress;
import java.net.ServerSocket;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.HashSet;
import java.util.List;
import java.util.Map;
import java.util.Random;
import java.util.Set;
import java.util.TreeMap;
import java.util.concurrent.CopyOnWriteArrayList;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicReference;

import static org.assertj.core.api.Assertions.assertThat;
import static org.awaitility.Awaitility.await;

/**
 * The fault test: a broker in a child JVM, {@code bracket monitor} in another, killed with
 * SIGKILL three times and restarted, and the broker stopped and restarted once, while good
 * events stream in with hostile records between them (every kind that once stopped or could
 * stop the monitor) and 100,000 fuzzed records (seeded byte mutations of a valid event).
 *
 * <p>Checked: every good event is counted exactly once; accepted plus rejected equals produced,
 * with no record on the rejected topic twice; each hostile record has its expected outcome;
 * the monitor never stops by itself (exit codes are only the kills' 137, and 143 for the final SIGTERM);
 * {@code /health/live} answers ok throughout, {@code /health/ready} reports the broker as failing
 * while it is down and is ready again after every restart.
 */
class MonitorFaultTest {

    private static final int GOOD = 20_000;
    private static final int FUZZED = 100_000;
    private static final int KILLS = 3;
    private static final ObjectMapper JSON = new ObjectMapper();
    private static final HttpClient HTTP = HttpClient.newBuilder().connectTimeout(Duration.ofSeconds(2)).build();
    private static final String ID_HEADER = "test.id";
    private static final String ACCEPTED = "accepted";

    @TempDir
    Path dir;

    /** A hostile record and what must happen to it: a reject reason, or {@link #ACCEPTED}. */
    private record Hostile(String kind, byte[] value, long timestamp, String expected) {
    }

    private static byte[] utf8(String s) {
        return s.getBytes(StandardCharsets.UTF_8);
    }

    private static Hostile h(String kind, String json, String expected) {
        return new Hostile(kind, utf8(json), -1, expected);
    }

    /** At least 25 kinds of bad or hostile records; study "hz" for those that may be accepted. */
    static List<Hostile> hostile() {
        String ok = "\"unit\":1,\"treated\":true,\"outcome\":0.5";
        List<Hostile> out = new ArrayList<>();
        out.add(h("time beyond epoch milliseconds", "{\"study\":\"hz\"," + ok + ",\"time\":\"+999999999-12-31T23:59:59Z\"}", "time-unrepresentable"));
        out.add(h("year 9999", "{\"study\":\"hz\"," + ok + ",\"time\":\"9999-12-31T23:59:59Z\"}", "time-too-far-ahead"));
        out.add(h("time a day ahead", "{\"study\":\"hz\"," + ok + ",\"time\":" + (System.currentTimeMillis() + 86_400_000L) + "}", "time-too-far-ahead"));
        out.add(h("year 0", "{\"study\":\"hz\"," + ok + ",\"time\":\"0000-06-01T00:00:00Z\"}", "time-unrepresentable"));
        out.add(h("time of 23 digits", "{\"study\":\"hz\"," + ok + ",\"time\":12345678901234567890123}", "time-unrepresentable"));
        out.add(h("smallest long time", "{\"study\":\"hz\"," + ok + ",\"time\":-9223372036854775808}", "time-unrepresentable"));
        out.add(h("time as a decimal", "{\"study\":\"hz\"," + ok + ",\"time\":1.7e12}", "wrong-type"));
        out.add(h("time as words", "{\"study\":\"hz\"," + ok + ",\"time\":\"yesterday\"}", "wrong-type"));
        byte[] big = new byte[1_048_000]; // just under the broker's default 1 MiB record batch limit
        Arrays.fill(big, (byte) 'x');
        byte[] head = utf8("{\"study\":\"hz\"," + ok + ",\"pad\":\"");
        System.arraycopy(head, 0, big, 0, head.length);
        big[big.length - 2] = '"';
        big[big.length - 1] = '}';
        out.add(new Hostile("record just under 1 MiB", big, -1, "too-large"));
        byte[] badUtf8 = utf8("{\"study\":\"hzX\"," + ok + "}");
        badUtf8[12] = (byte) 0xC3; // a lead byte followed by '"': not UTF-8
        out.add(new Hostile("invalid UTF-8", badUtf8, -1, "bad-json"));
        out.add(h("NaN outcome", "{\"study\":\"hz\",\"unit\":1,\"treated\":true,\"outcome\":NaN}", "bad-json"));
        out.add(h("Infinity outcome", "{\"study\":\"hz\",\"unit\":1,\"treated\":true,\"outcome\":Infinity}", "bad-json"));
        out.add(h("outcome 1e400", "{\"study\":\"hz\",\"unit\":1,\"treated\":true,\"outcome\":1e400}", "out-of-range"));
        out.add(h("outcome of 30 digits", "{\"study\":\"hz\",\"unit\":1,\"treated\":true,\"outcome\":123456789012345678901234567890}", "out-of-range"));
        out.add(h("outcome out of range", "{\"study\":\"hz\",\"unit\":1,\"treated\":true,\"outcome\":1.5}", "out-of-range"));
        out.add(h("nested object outcome", "{\"study\":\"hz\",\"unit\":1,\"treated\":true,\"outcome\":{\"v\":0.5}}", "wrong-type"));
        out.add(h("array of events", "[{\"study\":\"hz\"," + ok + "}]", "bad-json"));
        out.add(h("missing unit", "{\"study\":\"hz\",\"treated\":true,\"outcome\":0.5}", "missing-field"));
        out.add(h("null outcome", "{\"study\":\"hz\",\"unit\":1,\"treated\":true,\"outcome\":null}", "missing-field"));
        out.add(h("treated as a string", "{\"study\":\"hz\",\"unit\":1,\"treated\":\"true\",\"outcome\":0.5}", "wrong-type"));
        out.add(h("study as a number", "{\"study\":7," + ok + "}", "wrong-type"));
        out.add(h("unknown study", "{\"study\":\"nobody\"," + ok + "}", "unknown-study"));
        out.add(h("study id of 60,000 characters", "{\"study\":\"" + "s".repeat(60_000) + "\"," + ok + "}", "unknown-study"));
        out.add(h("empty line", "", "bad-json"));
        out.add(h("blanks only", "   ", "bad-json"));
        byte[] garbage = new byte[512];
        new Random(99).nextBytes(garbage);
        garbage[0] = (byte) 0xFF;
        out.add(new Hostile("binary garbage", garbage, -1, "bad-json"));
        out.add(h("1,000 levels of nesting and more", "{\"study\":\"hz\",\"x\":" + "[".repeat(5_000) + "]".repeat(5_000) + "," + ok + "}", "bad-json"));
        out.add(h("content after the object", "{\"study\":\"hz\"," + ok + "} {}", "bad-json"));
        out.add(h("single quotes", "{'study':'hz','unit':1,'treated':true,'outcome':0.5}", "bad-json"));
        out.add(h("control character in a string", "{\"study\":\"h\u0001z\"," + ok + "}", "bad-json"));
        // (A record timestamp far ahead never arrives: brokers refuse it, log.message.timestamp.after.max.ms.)
        long now = System.currentTimeMillis();
        out.add(new Hostile("time two days after its record timestamp", utf8("{\"study\":\"hz\"," + ok + ",\"time\":" + now + "}"),
                now - 2 * 86_400_000L, "time-too-far-ahead"));
        out.add(h("a key given twice", "{\"study\":\"hz\",\"unit\":1,\"treated\":false,\"outcome\":7,\"outcome\":0.25}", "bad-json"));
        // Hostile in form, usable in content: these count in study hz.
        out.add(h("negative zero outcome", "{\"study\":\"hz\",\"unit\":1,\"treated\":true,\"outcome\":-0.0}", ACCEPTED));
        out.add(h("unicode escapes in the study", "{\"study\":\"h\\u007a\"," + ok + "}", ACCEPTED));
        out.add(h("outcome with an exponent", "{\"study\":\"hz\",\"unit\":1,\"treated\":false,\"outcome\":5E-1}", ACCEPTED));
        out.add(h("byte order mark", "\uFEFF{\"study\":\"hz\"," + ok + "}", ACCEPTED));
        return out;
    }

    /** 100,000 seeded mutations of a valid event of study "fz": flipped, dropped, inserted or cut bytes. */
    static List<byte[]> fuzzed(long seed) {
        Random rnd = new Random(seed);
        List<byte[]> out = new ArrayList<>(FUZZED);
        while (out.size() < FUZZED) {
            byte[] b = utf8(String.format(java.util.Locale.ROOT, "{\"study\":\"fz\",\"unit\":\"u%d\",\"treated\":%s,\"outcome\":%s,\"time\":%d}",
                    rnd.nextInt(1000), rnd.nextBoolean(), rnd.nextDouble(), System.currentTimeMillis() - rnd.nextInt(600_000)));
            int mutations = 1 + rnd.nextInt(3);
            for (int m = 0; m < mutations && b.length > 1; m++) {
                int at = rnd.nextInt(b.length);
                b = switch (rnd.nextInt(4)) {
                    case 0 -> { b[at] = (byte) rnd.nextInt(256); yield b; }
                    case 1 -> concat(Arrays.copyOf(b, at), Arrays.copyOfRange(b, at + 1, b.length));
                    case 2 -> concat(concat(Arrays.copyOf(b, at), new byte[] {(byte) rnd.nextInt(256)}), Arrays.copyOfRange(b, at, b.length));
                    default -> Arrays.copyOf(b, at);
                };
            }
            String text = new String(b, StandardCharsets.ISO_8859_1);
            if (!text.contains("s1") && !text.contains("hz")) { // s1 holds only the good events, hz only the hostile ones
                out.add(b);
            }
        }
        return out;
    }

    private static byte[] concat(byte[] a, byte[] b) {
        byte[] out = Arrays.copyOf(a, a.length + b.length);
        System.arraycopy(b, 0, out, a.length, b.length);
        return out;
    }

    @Test
    @DisplayName("SIGKILLed three times, a broker bounce, 36 kinds of hostile records and 100,000 fuzzed ones: nothing lost or counted twice")
    void survivesKillsBounceAndHostileRecords() throws Exception {
        List<Hostile> hostile = hostile();
        assertThat(hostile.stream().map(Hostile::kind).distinct()).hasSizeGreaterThanOrEqualTo(25);
        List<byte[]> fuzzed = fuzzed(8);
        int brokerPort = freePort();
        String bootstrap = "localhost:" + brokerPort;
        Path brokerDir = dir.resolve("kafka");
        Process broker = startBroker(brokerDir, brokerPort, 0);
        Path config = dir.resolve("fault.yaml");
        Files.writeString(config, """
                studies:
                  - id: s1
                    outcome: {min: 0, max: 1}
                    assume: [[worst-case]]
                  - id: hz
                    outcome: {min: 0, max: 1}
                    assume: [[worst-case]]
                  - id: fz
                    outcome: {min: 0, max: 1}
                    assume: [[worst-case]]
                inputs:
                  - topic: fault-events
                topics: {rejected: fault-rejected, partials: fault-partials, bounds: fault-bounds, partitions: 3, replication: 1}
                windows:
                  - {name: hourly, kind: tumbling, size: 1h}
                commit-interval: 300ms
                publish-interval: 300ms
                group: fault
                instance: fault-child
                kafka:
                  bootstrap.servers: %s
                  session.timeout.ms: 6000
                  heartbeat.interval.ms: 1000
                """.formatted(bootstrap));
        BracketConfig parsed = BracketConfig.load(config);
        try (var admin = new KafkaClients(parsed).admin()) {
            TopicSetup.ensureTopics(admin, parsed);
        }

        List<String> samples = new CopyOnWriteArrayList<>();
        AtomicReference<Integer> httpPort = new AtomicReference<>();
        AtomicReference<String> phase = new AtomicReference<>("start");
        Thread watcher = new Thread(() -> watchHealth(httpPort, phase, samples), "test-health-watcher");
        watcher.setDaemon(true);
        List<Process> monitors = new ArrayList<>();
        Process monitor = startMonitor(config, httpPort, monitors);
        watcher.start();
        AtomicReference<Throwable> producerFailure = new AtomicReference<>();
        int[] goodArms = new int[2];
        Thread producing = new Thread(() -> produce(bootstrap, hostile, fuzzed, goodArms, producerFailure), "test-producer");
        try {
            awaitReady(httpPort);
            producing.start();
            for (int kill = 0; kill < KILLS; kill++) {
                TimeUnit.SECONDS.sleep(3); // let it work and commit a little
                monitor.destroyForcibly(); // SIGKILL
                assertThat(monitor.waitFor(30, TimeUnit.SECONDS)).isTrue();
                assertThat(monitor.exitValue()).isEqualTo(137);
                monitor = startMonitor(config, httpPort, monitors);
                awaitReady(httpPort);
                if (kill == 0) {
                    phase.set("broker-down");
                    broker.destroy(); // SIGTERM: a clean broker stop
                    assertThat(broker.waitFor(60, TimeUnit.SECONDS)).isTrue();
                    TimeUnit.SECONDS.sleep(12); // down long enough for the probe (kept 5 s) and the waiting line (every 10 s)
                    phase.set("broker-restarting");
                    broker = startBroker(brokerDir, brokerPort, 1);
                    awaitReady(httpPort);
                    phase.set("running");
                }
            }
            producing.join(Duration.ofMinutes(2).toMillis());
            assertThat(producerFailure.get()).isNull();
            assertThat(producing.isAlive()).isFalse();

            int produced = GOOD + hostile.size() + fuzzed.size();
            await().atMost(Duration.ofSeconds(90)).pollInterval(Duration.ofSeconds(1)).untilAsserted(() -> {
                Map<String, JsonNode> docs = latestDocuments(bootstrap);
                JsonNode s1 = docs.get("s1/cumulative");
                assertThat(s1).isNotNull();
                assertThat(s1.get("arms").get("treated").get("n").asLong()).as("s1 treated").isEqualTo(goodArms[1]);
                assertThat(s1.get("arms").get("control").get("n").asLong()).as("s1 control").isEqualTo(goodArms[0]);
            });
            Map<String, JsonNode> docs = latestDocuments(bootstrap);
            long acceptedOther = units(docs.get("hz/cumulative")) + units(docs.get("fz/cumulative"));
            List<ConsumerRecord<byte[], byte[]>> rejected = KafkaTestSupport.readAll(bootstrap, "fault-rejected");
            Map<String, String> reasonById = new TreeMap<>();
            Set<String> copies = new HashSet<>();
            int truncated = 0;
            for (ConsumerRecord<byte[], byte[]> r : rejected) {
                String source = header(r, "bracket.source.partition") + "@" + header(r, "bracket.source.offset");
                assertThat(copies.add(source)).as("rejected twice: " + source).isTrue();
                String id = header(r, ID_HEADER);
                if (header(r, "bracket.truncated") != null) {
                    truncated++;
                    id = "h" + hostile.stream().map(Hostile::kind).toList().indexOf("record just under 1 MiB");
                }
                assertThat(id).as("a good event was rejected").isNotNull().doesNotStartWith("g");
                reasonById.put(id, header(r, "bracket.reason"));
            }
            assertThat(truncated).isEqualTo(1);
            // accepted + rejected = produced, each exactly once
            assertThat(GOOD + acceptedOther + rejected.size()).isEqualTo(produced);
            for (int i = 0; i < hostile.size(); i++) {
                Hostile hz = hostile.get(i);
                String got = reasonById.getOrDefault("h" + i, ACCEPTED);
                assertThat(got).as(hz.kind()).isEqualTo(hz.expected());
            }
            long hostileAccepted = hostile.stream().filter(x -> x.expected().equals(ACCEPTED)).count();
            assertThat(units(docs.get("hz/cumulative"))).isEqualTo(hostileAccepted);
            System.out.printf("fault test: produced %d (good %d, hostile %d, fuzzed %d); accepted %d; rejected %d (%d distinct reasons);"
                    + " %d health samples%n", produced, GOOD, hostile.size(), fuzzed.size(), GOOD + acceptedOther, rejected.size(),
                    new HashSet<>(reasonById.values()).size(), samples.size());

            // Readiness throughout: live always; not ready while the broker was down; ready now.
            phase.set("end");
            awaitReady(httpPort);
            List<String> down = samples.stream().filter(s -> s.startsWith("broker-down-late ")).toList();
            assertThat(down).isNotEmpty().allMatch(s -> s.contains("ready=503") && s.contains("broker"));
            assertThat(samples).allMatch(s -> !s.contains("live=503"));
            assertThat(samples.stream().filter(s -> s.contains("ready=200"))).isNotEmpty();
            String log = Files.readString(dir.resolve("monitor-1.log"));
            assertThat(log).contains("unreachable for");
            for (int i = 0; i < monitors.size(); i++) {
                assertThat(Files.readString(dir.resolve("monitor-" + i + ".log"))).doesNotContain("of the monitor stopped");
            }
            monitor.destroy(); // SIGTERM: the last one stops after a final commit
            assertThat(monitor.waitFor(60, TimeUnit.SECONDS)).isTrue();
            assertThat(monitor.exitValue()).isEqualTo(143); // 128 + SIGTERM, after the shutdown hook ran
            assertThat(Files.readString(dir.resolve("monitor-" + (monitors.size() - 1) + ".log"))).contains("stopped after a final commit");
        } finally {
            producing.interrupt();
            watcher.interrupt();
            for (Process p : monitors) {
                p.destroyForcibly();
            }
            broker.destroyForcibly();
            broker.waitFor(30, TimeUnit.SECONDS);
        }
    }

    /** The newest bound document per key. */
    private static Map<String, JsonNode> latestDocuments(String bootstrap) throws IOException {
        Map<String, JsonNode> out = new TreeMap<>();
        for (ConsumerRecord<byte[], byte[]> r : KafkaTestSupport.readAll(bootstrap, "fault-bounds")) {
            out.put(new String(r.key(), StandardCharsets.UTF_8), JSON.readTree(r.value()));
        }
        return out;
    }

    private static long units(JsonNode doc) {
        return doc == null ? 0 : doc.get("arms").get("treated").get("n").asLong() + doc.get("arms").get("control").get("n").asLong();
    }

    /** Good events ("g" ids, study s1, one unit each) with the hostile and fuzzed records spread between them. */
    private static void produce(String bootstrap, List<Hostile> hostile, List<byte[]> fuzzed, int[] arms, AtomicReference<Throwable> failure) {
        Map<String, Object> props = new HashMap<>();
        props.put(ProducerConfig.BOOTSTRAP_SERVERS_CONFIG, bootstrap);
        props.put(ProducerConfig.ENABLE_IDEMPOTENCE_CONFIG, true);
        props.put(ProducerConfig.ACKS_CONFIG, "all");
        props.put(ProducerConfig.LINGER_MS_CONFIG, 10);
        props.put(ProducerConfig.MAX_REQUEST_SIZE_CONFIG, 2 << 20); // the near-1 MiB record must get through
        props.put(ProducerConfig.DELIVERY_TIMEOUT_MS_CONFIG, 120_000); // outlives the broker bounce
        props.put(ProducerConfig.MAX_BLOCK_MS_CONFIG, 120_000);
        Random rnd = new Random(3);
        int total = GOOD + hostile.size() + fuzzed.size();
        int h = 0;
        int f = 0;
        int g = 0;
        try (KafkaProducer<byte[], byte[]> producer = new KafkaProducer<>(props, new ByteArraySerializer(), new ByteArraySerializer())) {
            long start = System.nanoTime();
            for (int n = 0; n < total; n++) {
                int left = total - n;
                int pick = rnd.nextInt(left);
                RecordHeaders headers = new RecordHeaders();
                ProducerRecord<byte[], byte[]> record;
                if (pick < hostile.size() - h) {
                    Hostile x = hostile.get(h);
                    headers.add(ID_HEADER, utf8("h" + h++));
                    record = new ProducerRecord<>("fault-events", null, x.timestamp() < 0 ? null : x.timestamp(), null,
                            x.value(), headers);
                } else if (pick < hostile.size() - h + fuzzed.size() - f) {
                    headers.add(ID_HEADER, utf8("f" + f));
                    record = new ProducerRecord<>("fault-events", null, null, null, fuzzed.get(f++), headers);
                } else {
                    boolean treated = g % 3 == 0;
                    arms[treated ? 1 : 0]++;
                    headers.add(ID_HEADER, utf8("g" + g));
                    record = new ProducerRecord<>("fault-events", null, null, null, utf8(String.format(java.util.Locale.ROOT,
                            "{\"study\":\"s1\",\"unit\":\"g%d\",\"treated\":%s,\"outcome\":%.3f,\"time\":%d}",
                            g++, treated, (g % 10) / 10.0, System.currentTimeMillis())), headers);
                }
                producer.send(record, (md, ex) -> {
                    if (ex != null) {
                        failure.compareAndSet(null, ex);
                    }
                });
                if (n % 500 == 0) {
                    long due = start + n * 300_000L; // 3,333 records per second: the stream spans the kills and the bounce
                    long wait = due - System.nanoTime();
                    if (wait > 0) {
                        TimeUnit.NANOSECONDS.sleep(wait);
                    }
                }
            }
            producer.flush();
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        } catch (RuntimeException e) {
            failure.compareAndSet(null, e);
        }
    }

    /** Samples both health endpoints twice a second: "PHASE live=CODE ready=CODE BODY". */
    private static void watchHealth(AtomicReference<Integer> port, AtomicReference<String> phase, List<String> samples) {
        long brokerDownSince = 0;
        while (!Thread.currentThread().isInterrupted()) {
            String p = phase.get();
            if (p.equals("broker-down")) {
                brokerDownSince = brokerDownSince == 0 ? System.nanoTime() : brokerDownSince;
                // The probe keeps its answer 5 s and waits 2 s: from 8 s on the broker must show as failing.
                if (System.nanoTime() - brokerDownSince > TimeUnit.SECONDS.toNanos(8)) {
                    p = "broker-down-late";
                }
            }
            Integer at = port.get();
            if (at != null) {
                String live = get(at, "/health/live");
                String ready = get(at, "/health/ready");
                if (live != null && ready != null) {
                    samples.add(p + " live=" + live.substring(0, 3) + " ready=" + ready);
                }
            }
            try {
                TimeUnit.MILLISECONDS.sleep(500);
            } catch (InterruptedException e) {
                return;
            }
        }
    }

    /** "CODE BODY", or null when nothing answers (the monitor is starting or was just killed). */
    private static String get(int port, String path) {
        try {
            HttpResponse<String> r = HTTP.send(HttpRequest.newBuilder(URI.create("http://127.0.0.1:" + port + path))
                    .timeout(Duration.ofSeconds(5)).build(), HttpResponse.BodyHandlers.ofString());
            return r.statusCode() + " " + r.body();
        } catch (IOException e) {
            return null;
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            return null;
        }
    }

    private static void awaitReady(AtomicReference<Integer> port) {
        await().atMost(Duration.ofSeconds(90)).pollInterval(Duration.ofMillis(500)).until(() -> {
            String ready = get(port.get(), "/health/ready");
            return ready != null && ready.startsWith("200");
        });
    }

    private Process startMonitor(Path config, AtomicReference<Integer> httpPort, List<Process> monitors) throws IOException {
        int port = freePort();
        Path log = dir.resolve("monitor-" + monitors.size() + ".log");
        Process p = new ProcessBuilder(java(), "-Xmx384m", "-cp", classpath(), "dev.bracket.cli.BracketCommand",
                "monitor", "--config", config.toString(), "--http-port", Integer.toString(port))
                .redirectErrorStream(true).redirectOutput(log.toFile()).start();
        monitors.add(p);
        httpPort.set(port);
        return p;
    }

    private Process startBroker(Path dataDir, int port, int run) throws IOException {
        Path log = dir.resolve("broker-" + run + ".log");
        Process p = new ProcessBuilder(java(), "-Xmx512m", "-cp", classpath(), "dev.bracket.broker.EmbeddedBroker",
                dataDir.toString(), Integer.toString(port))
                .redirectErrorStream(true).redirectOutput(log.toFile()).start();
        await().atMost(Duration.ofSeconds(90)).pollInterval(Duration.ofMillis(200))
                .until(() -> !p.isAlive() || Files.readString(log).contains("bootstrap.servers="));
        assertThat(p.isAlive()).as("broker started; see " + log).isTrue();
        return p;
    }

    private static String java() {
        return Path.of(System.getProperty("java.home"), "bin", "java").toString();
    }

    private static String classpath() {
        return System.getProperty("surefire.test.class.path", System.getProperty("java.class.path"));
    }

    private static int freePort() throws IOException {
        try (ServerSocket s = new ServerSocket(0, 1, InetAddress.getLoopbackAddress())) {
            return s.getLocalPort();
        }
    }

    private static String header(ConsumerRecord<byte[], byte[]> r, String name) {
        Header h = r.headers().lastHeader(name);
        return h == null ? null : new String(h.value(), StandardCharsets.UTF_8);
    }
}
