package dev.bracket.stream;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.bracket.alerts.delivery.Receiver;
import dev.bracket.broker.BrokerPerClass;
import dev.bracket.broker.ChildMonitor;
import dev.bracket.app.TopicSetup;
import dev.bracket.stream.transaction.KafkaClients;
import dev.bracket.stream.transaction.PartialsCodec;
import dev.bracket.config.BracketConfig;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.admin.AdminClientConfig;
import org.apache.kafka.clients.admin.ConsumerGroupDescription;
import org.apache.kafka.clients.admin.MemberDescription;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.TopicPartition;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.RegisterExtension;
import org.junit.jupiter.api.io.TempDir;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Random;
import java.util.TreeMap;
import java.util.concurrent.TimeUnit;
import java.util.stream.Collectors;

import static org.assertj.core.api.Assertions.assertThat;
import static org.awaitility.Awaitility.await;

/**
 * Three monitor instances (child JVMs) of one group on one broker share three studies through
 * the updater group. The instance owning one study is killed with SIGKILL between two phases of
 * data; a survivor takes the study over. Checked: each study's bound documents are never closer
 * than one publish interval (one publisher at a time, before and after the kill), every alert
 * transition reaches the webhook receiver exactly once, and the transitions are exactly those the
 * data call for (none fired again by the new owner).
 *
 * <p>The expected transitions follow from Manski and Pepper (2000), Econometrica 68(4): under
 * monotone treatment selection alone the ATE is bounded on one side by the difference of observed
 * means, E[Y|T=1] - E[Y|T=0] (lower bound under mts-negative, upper bound under mts-positive),
 * and on the other by the worst-case bound, which lies on the far side of zero for outcomes in [0, 1].
 * Phase 1 (difference about +0.6) identifies a positive sign under mts-negative only; phase 2
 * (cumulative difference about -0.5) resolves it and identifies a negative sign under mts-positive.
 */
class ScaleOutFailoverTest {

    private static final List<String> STUDIES = List.of("delta", "beta", "alpha"); // partials partitions 0, 1, 2 of 3
    private static final long INTERVAL_MS = 1_000;
    private static final ObjectMapper JSON = new ObjectMapper();

    @RegisterExtension
    static final BrokerPerClass KAFKA = new BrokerPerClass();

    @TempDir
    static Path dir;

    @Test
    @DisplayName("killing a study's owner among three instances: one document per interval, each alert delivered once")
    void ownerKilledMidStream() throws Exception {
        try (Receiver hook = new Receiver();
             Admin admin = Admin.create(Map.of(AdminClientConfig.BOOTSTRAP_SERVERS_CONFIG, KAFKA.bootstrapServers()))) {
            hook.start(n -> 200);
            List<Path> configs = new ArrayList<>();
            for (int i = 0; i < 3; i++) {
                configs.add(writeConfig("so-" + i, hook.url()));
            }
            BracketConfig first = BracketConfig.load(configs.get(0));
            try (var setupAdmin = new KafkaClients(first).admin()) {
                TopicSetup.ensureTopics(setupAdmin, first);
            }
            assertThat(STUDIES).extracting(s -> PartialsCodec.partitionFor(s, 3)).containsExactly(0, 1, 2);
            Map<String, Process> children = new TreeMap<>();
            try {
                for (int i = 0; i < 3; i++) {
                    children.put("so-" + i, startChild(configs.get(i), i));
                }
                await().atMost(Duration.ofSeconds(60)).pollInterval(Duration.ofMillis(500)).ignoreExceptions()
                        .until(() -> owners(admin).size() == 3);

                Map<String, Long> produced = new HashMap<>();
                produce(1_500, 0.8, 0.2, 1, produced);
                await().atMost(Duration.ofSeconds(30)).until(() -> delivered(hook).size() == 3);

                String victim = owners(admin).get(0);
                long killedAt = System.currentTimeMillis();
                Process p = children.get(victim);
                p.destroyForcibly(); // SIGKILL on Unix
                assertThat(p.waitFor(30, TimeUnit.SECONDS)).isTrue();
                assertThat(p.exitValue()).isEqualTo(137);
                produce(6_000, 0.1, 0.9, 2, produced);

                await().atMost(Duration.ofSeconds(45)).pollInterval(Duration.ofMillis(500)).until(() -> delivered(hook).size() == 9
                        && lastCounts().equals(produced));
                Thread.sleep(3 * INTERVAL_MS); // room for a duplicate to show up, were there one

                List<ConsumerRecord<byte[], byte[]>> bounds = KafkaTestSupport.readAll(KAFKA.broker(), "so-bounds");
                Map<String, List<Long>> times = new TreeMap<>();
                for (ConsumerRecord<byte[], byte[]> r : bounds) {
                    times.computeIfAbsent(new String(r.key(), StandardCharsets.UTF_8), k -> new ArrayList<>()).add(r.timestamp());
                }
                assertThat(times.keySet()).containsExactlyInAnyOrder("alpha/cumulative", "beta/cumulative", "delta/cumulative");
                String takenOver = STUDIES.get(0) + "/cumulative";
                long firstAfterKill = times.get(takenOver).stream().filter(t -> t > killedAt).min(Long::compare).orElseThrow();
                times.forEach((key, ts) -> {
                    for (int i = 1; i < ts.size(); i++) {
                        // The broker keeps one partition's records in send order; the create time is
                        // taken in milliseconds right after the publisher's interval check.
                        assertThat(ts.get(i) - ts.get(i - 1)).as("gap before document %d of %s (times %s)", i, key, ts).isGreaterThanOrEqualTo(INTERVAL_MS - 1);
                    }
                });
                assertThat(times.get(takenOver)).as("documents before the kill").anyMatch(t -> t < killedAt);

                List<JsonNode> transitions = new ArrayList<>();
                for (Receiver.Request r : hook.requests()) {
                    if (r.status() / 100 == 2) {
                        transitions.add(JSON.readTree(r.body()));
                    }
                }
                Map<String, Long> perId = transitions.stream().collect(Collectors.groupingBy(t -> t.get("transitionId").asText(), Collectors.counting()));
                assertThat(perId.values()).as("each transition delivered once").containsOnly(1L);
                Map<String, List<String>> byKey = new TreeMap<>();
                transitions.stream().sorted((a, b) -> Long.compare(a.get("sequence").asLong(), b.get("sequence").asLong()))
                        .forEach(t -> byKey.computeIfAbsent(t.get("key").asText(), k -> new ArrayList<>())
                                .add(t.get("sequence").asLong() + " " + t.get("state").asText() + " " + t.get("variant").asText()));
                Map<String, List<String>> expected = new TreeMap<>();
                for (String study : STUDIES) {
                    expected.put(study + "/mts-negative/cumulative/sign-identified", List.of("1 firing positive", "2 resolved positive"));
                    expected.put(study + "/mts-positive/cumulative/sign-identified", List.of("1 firing negative"));
                }
                assertThat(byKey).isEqualTo(expected);
                List<ConsumerRecord<byte[], byte[]>> alertRecords = KafkaTestSupport.readAll(KAFKA.broker(), "so-alerts");
                assertThat(alertRecords).as("transitions recorded in the alerts topic (none fired again)").hasSize(9);
                System.out.printf(Locale.ROOT, "scale-out failover: killed %s (owner of %s); first document of %s by the new owner %d ms"
                                + " after SIGKILL (session.timeout.ms 6000, publish interval %d ms); documents per key %s%n",
                        victim, STUDIES.get(0), STUDIES.get(0), firstAfterKill - killedAt, INTERVAL_MS,
                        times.entrySet().stream().collect(Collectors.toMap(Map.Entry::getKey, e -> e.getValue().size(), (a, b) -> a, TreeMap::new)));
            } finally {
                children.values().forEach(Process::destroyForcibly);
            }
        }
    }

    /** The instance owning each partials partition, by partition number. */
    private static Map<Integer, String> owners(Admin admin) throws Exception {
        ConsumerGroupDescription group = admin.describeConsumerGroups(List.of("so-updaters")).all().get(30, TimeUnit.SECONDS).get("so-updaters");
        Map<Integer, String> out = new TreeMap<>();
        for (MemberDescription m : group.members()) {
            for (TopicPartition tp : m.assignment().topicPartitions()) {
                out.put(tp.partition(), m.clientId().substring("bracket-updater-".length()));
            }
        }
        return out.values().stream().distinct().count() == 3 ? out : Map.of();
    }

    /** Unique transitions acknowledged by the receiver. */
    private static List<String> delivered(Receiver hook) {
        return hook.requests().stream().filter(r -> r.status() / 100 == 2).map(Receiver.Request::idempotencyKey).distinct().toList();
    }

    /** Events per study and arm in the newest bound documents. */
    private static Map<String, Long> lastCounts() throws Exception {
        Map<String, Long> out = new HashMap<>();
        MonitorEndToEndTest.latestDocuments(KAFKA.broker(), "so-bounds").forEach((key, doc) -> {
            String study = doc.get("study").asText();
            out.put(study + "/treated", doc.get("arms").get("treated").get("n").asLong());
            out.put(study + "/control", doc.get("arms").get("control").get("n").asLong());
        });
        return out;
    }

    /** {@code perStudy} events for each study, half treated, binary outcomes with the given means. */
    private static void produce(int perStudy, double treatedMean, double controlMean, long seed, Map<String, Long> counts) {
        Random rnd = new Random(seed);
        long time = System.currentTimeMillis();
        try (KafkaProducer<byte[], byte[]> producer = KafkaTestSupport.producer(KAFKA.broker())) {
            for (int i = 0; i < perStudy; i++) {
                for (String study : STUDIES) {
                    boolean treated = rnd.nextBoolean();
                    int y = rnd.nextDouble() < (treated ? treatedMean : controlMean) ? 1 : 0;
                    String unit = study + "-" + seed + "-" + i;
                    String json = String.format(Locale.ROOT, "{\"study\":\"%s\",\"unit\":\"%s\",\"treated\":%s,\"outcome\":%d,\"time\":%d}",
                            study, unit, treated, y, time);
                    producer.send(new ProducerRecord<>("so-events", unit.getBytes(StandardCharsets.UTF_8), json.getBytes(StandardCharsets.UTF_8)));
                    counts.merge(study + (treated ? "/treated" : "/control"), 1L, Long::sum);
                }
            }
            producer.flush();
        }
    }

    private static Path writeConfig(String instance, String hookUrl) throws IOException {
        StringBuilder studies = new StringBuilder();
        for (String s : STUDIES) {
            studies.append("""
                      - id: %s
                        outcome: {min: 0, max: 1}
                        assume: [[mts-negative], [mts-positive]]
                        alerts:
                          min-per-arm: 30
                          clear-after: 3
                          rules:
                            sign-identified: {clear-zero-margin: 0.005}
                          webhooks:
                            - url: %s
                    """.formatted(s, hookUrl));
        }
        Path config = dir.resolve(instance + ".yaml");
        Files.writeString(config, "studies:\n" + studies + """
                inputs:
                  - topic: so-events
                topics: {rejected: so-rejected, partials: so-partials, bounds: so-bounds, partitions: 3}
                commit-interval: 200ms
                publish-interval: %dms
                progress-interval: 5s
                group: so
                instance: %s
                alerts: {topic: so-alerts, check-interval: 1s}
                kafka:
                  bootstrap.servers: %s
                  session.timeout.ms: 6000
                  heartbeat.interval.ms: 1000
                """.formatted(INTERVAL_MS, instance, KAFKA.bootstrapServers()));
        return config;
    }

    private static Process startChild(Path config, int n) throws IOException {
        return ChildMonitor.start(config, dir.resolve("so-" + n + ".log"), "256m"); // with --http-port 0
    }
}
