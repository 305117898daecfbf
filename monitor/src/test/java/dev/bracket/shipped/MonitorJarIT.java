package dev.bracket.shipped;

import com.fasterxml.jackson.databind.JsonNode;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

import java.net.InetAddress;
import java.net.ServerSocket;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;
import static org.awaitility.Awaitility.await;

/**
 * {@code java -jar bracket.jar monitor} on its embedded broker, fed by {@code demo-producer} from
 * the same jar: the simulation, then a file with every kind of line end, which {@code replay}
 * (also from the jar) must count the same way.
 */
@DisplayName("bracket.jar monitor fed by bracket.jar demo-producer")
class MonitorJarIT {

    private static final Pattern PAGE = Pattern.compile("web page, JSON API and Prometheus metrics at (http://127\\.0\\.0\\.1:\\d+/)");

    @TempDir
    Path dir;

    @Test
    @DisplayName("events sent by demo-producer reach the monitor's report; a file's lines count as replay counts them; SIGTERM stops it")
    void monitorOnItsOwnBroker() throws Exception {
        int port;
        try (ServerSocket free = new ServerSocket(0, 1, InetAddress.getLoopbackAddress())) {
            port = free.getLocalPort();
        }
        Path config = Files.writeString(dir.resolve("bracket.yaml"), """
                studies:
                  - id: host-rollout
                    outcome: {min: 0, max: 1}
                    assume: [[worst-case]]
                progress-interval: 500ms
                commit-interval: 300ms
                instance: jar-test
                broker: {data-dir: '%s', port: %d}
                """.formatted(dir.resolve("kafka"), port));
        Path events = Files.writeString(dir.resolve("mixed.jsonl"), ReplayCalcJarIT.MIXED_LINE_ENDS);

        try (JarProcess monitor = JarProcess.start(dir, "monitor", "monitor", "--config", config.toString(), "--http-port", "0")) {
            await().atMost(Duration.ofSeconds(90)).until(() -> monitor.out().contains("partitions 3") || !monitor.isAlive());
            assertThat(monitor.out()).as(monitor.err()).contains("Kafka broker listening at localhost:" + port);
            Matcher page = PAGE.matcher(monitor.out());
            assertThat(page.find()).isTrue();

            try (JarProcess producer = JarProcess.start(dir, "producer", "demo-producer", "--bootstrap-servers", "localhost:" + port,
                    "--count", "3000", "--rate", "0", "--seed", "5")) {
                assertThat(producer.awaitExit(Duration.ofSeconds(60))).as(producer.err()).isZero();
                assertThat(producer.out()).contains("the broker acknowledged 3000, refused 0");
            }
            await().atMost(Duration.ofSeconds(60)).pollInterval(Duration.ofMillis(500)).ignoreExceptions().untilAsserted(() ->
                    assertThat(cumulative(page.group(1)).path("counts").path("total").asLong()).isEqualTo(3000));
            JsonNode report = cumulative(page.group(1)).path("report");
            checkWorstCase(report);

            try (JarProcess file = JarProcess.start(dir, "file", "demo-producer", "--bootstrap-servers", "localhost:" + port,
                    "--from-file", events.toString(), "--rate", "0")) {
                assertThat(file.awaitExit(Duration.ofSeconds(60))).as(file.err()).isZero();
                assertThat(file.out()).contains("Sent 7 events; the broker acknowledged 7");
            }
            // replay of the same file (ReplayCalcJarIT): 5 events used, 2 lines rejected; the monitor must count alike.
            await().atMost(Duration.ofSeconds(60)).until(() -> monitor.out().contains("events used 3005, rejected 2,"));

            monitor.assertCompleteJar();
            assertThat(monitor.stop(Duration.ofSeconds(60))).as("exit code after SIGTERM (128 + 15)").isEqualTo(143);
            assertThat(monitor.out()).contains("stopped after a final commit");
        }
    }

    private static JsonNode cumulative(String page) throws Exception {
        for (JsonNode w : JarProcess.getJson(page + "api/studies/host-rollout").path("windows")) {
            if (w.path("window").asText().equals("cumulative")) {
                return w;
            }
        }
        throw new AssertionError("no cumulative window yet");
    }

    /**
     * Worst-case bounds (Manski 1990) from the report's own arms, outcomes in [a, b] = [0, 1]:
     * lower = p*mu1 + (1-p)*a - p*b - (1-p)*mu0, upper = p*mu1 + (1-p)*b - p*a - (1-p)*mu0.
     */
    static void checkWorstCase(JsonNode report) {
        JsonNode arms = report.path("arms");
        double n1 = arms.path("treated").path("n").asDouble();
        double n0 = arms.path("control").path("n").asDouble();
        double mu1 = arms.path("treated").path("mean").asDouble();
        double mu0 = arms.path("control").path("mean").asDouble();
        double p = n1 / (n1 + n0);
        JsonNode row = report.path("bounds").get(0);
        assertThat(row.path("assumptions").get(0).asText()).isEqualTo("worst-case");
        assertThat(row.path("lower").asDouble()).isCloseTo(p * mu1 - p - (1 - p) * mu0, within(1e-9));
        assertThat(row.path("upper").asDouble()).isCloseTo(p * mu1 + (1 - p) - (1 - p) * mu0, within(1e-9));
    }
}
