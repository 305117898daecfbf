package dev.bracket.cli;

import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;


import java.io.IOException;
import java.net.InetAddress;
import java.net.ServerSocket;
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
 * start reuses the broker's data directory. A broker that cannot start ends the command at once.
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

    @Test
    @DisplayName("a broker port that is taken ends the monitor at once: one line naming the port and what to change, exit code 1")
    void takenBrokerPortFailsAtOnce() throws Exception {
        try (ServerSocket taken = new ServerSocket(0, 1, InetAddress.getLoopbackAddress())) {
            CalcCommandTest.Run r = runInProcess(configWithBroker(dir.resolve("kafka"), taken.getLocalPort()));

            assertThat(r.exitCode()).isEqualTo(1);
            assertThat(r.errLines()).hasSize(1);
            assertThat(r.err()).startsWith("monitor: cannot start the embedded Kafka broker: port " + taken.getLocalPort()
                    + " on localhost is in use").contains("set broker.port");
            assertThat(dir.resolve("kafka/meta.properties")).doesNotExist();
        }
    }

    @Test
    @DisplayName("a broker data directory that cannot be created ends the monitor at once: one line, exit code 1")
    void unusableDataDirectoryFailsAtOnce() throws Exception {
        Path file = Files.writeString(dir.resolve("not-a-directory"), "x");
        CalcCommandTest.Run r = runInProcess(configWithBroker(file.resolve("kafka"), 0));

        assertThat(r.exitCode()).isEqualTo(1);
        assertThat(r.errLines()).hasSize(1);
        assertThat(r.err()).startsWith("monitor: cannot start the embedded Kafka broker: its data directory " + file.resolve("kafka")
                + " cannot be created or written").contains("set broker.data-dir");
    }

    private Path configWithBroker(Path dataDir, int port) throws IOException {
        return Files.writeString(dir.resolve("broker.yaml"), """
                studies:
                  - id: checkout
                    outcome: {min: 0, max: 1}
                broker: {data-dir: '%s'%s}
                """.formatted(dataDir, port == 0 ? "" : ", port: " + port));
    }

    /** The command line in this JVM (the runner of {@link CalcCommandTest} takes any subcommand). */
    private static CalcCommandTest.Run runInProcess(Path config) {
        return CalcCommandTest.run("monitor", "--config", config.toString(), "--http-port", "0");
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
