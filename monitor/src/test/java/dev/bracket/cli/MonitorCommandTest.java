package dev.bracket.cli;

import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.concurrent.TimeUnit;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

import static org.assertj.core.api.Assertions.assertThat;
import static org.awaitility.Awaitility.await;

/**
 * {@code bracket monitor} as a user runs it, in a child JVM: without bootstrap servers it starts
 * its own broker and prints the address, prints progress, stops cleanly on SIGTERM, and a second
 * start reuses the broker's data directory.
 */
class MonitorCommandTest {

    private static final Pattern ADDRESS = Pattern.compile("Kafka broker listening at (localhost:\\d+)");

    @TempDir
    Path dir;

    @Test
    @DisplayName("without bootstrap servers the monitor runs its own broker, stops on SIGTERM and reuses the data directory")
    void embeddedBrokerLifecycle() throws Exception {
        Path data = dir.resolve("state/kafka");
        Path config = dir.resolve("bracket.yaml");
        Files.writeString(config, """
                studies:
                  - id: checkout
                    outcome: {min: 0, max: 1}
                progress-interval: 500ms
                instance: cli-test
                broker:
                  data-dir: %s
                """.formatted(data));

        String first = runUntilProgressThenStop(config, dir.resolve("first.log"));
        assertThat(first).contains("starting a Kafka broker in this process, data in " + data)
                .contains("monitoring 1 study from bracket-events; reports to topic bracket-bounds")
                .contains("events used 0, rejected 0, late 0; partitions 3")
                .contains("stopped after a final commit");
        assertThat(data.resolve("meta.properties")).exists();
        String clusterId = Files.readString(data.resolve("meta.properties"));

        String second = runUntilProgressThenStop(config, dir.resolve("second.log"));
        assertThat(second).contains("stopped after a final commit");
        assertThat(Files.readString(data.resolve("meta.properties"))).as("formatted once, then reused").isEqualTo(clusterId);
        assertThat(Files.list(data).map(p -> p.getFileName().toString())).contains("bracket-partials-0", "bracket-events-0");
    }

    private static String runUntilProgressThenStop(Path config, Path log) throws IOException, InterruptedException {
        String java = Path.of(System.getProperty("java.home"), "bin", "java").toString();
        String classpath = System.getProperty("surefire.test.class.path", System.getProperty("java.class.path"));
        Process p = new ProcessBuilder(java, "-Xmx384m", "-cp", classpath, "dev.bracket.cli.BracketCommand", "monitor", "--config", config.toString(),
                "--http-port", "0")
                .redirectErrorStream(true).redirectOutput(log.toFile()).start();
        try {
            await().atMost(Duration.ofSeconds(90)).until(() -> Files.readString(log).contains("partitions 3"));
            Matcher m = ADDRESS.matcher(Files.readString(log));
            assertThat(m.find()).isTrue();
            p.destroy(); // SIGTERM
            assertThat(p.waitFor(60, TimeUnit.SECONDS)).isTrue();
            return Files.readString(log);
        } finally {
            p.destroyForcibly();
        }
    }
}
