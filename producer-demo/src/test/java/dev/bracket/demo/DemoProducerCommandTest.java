package dev.bracket.demo;

import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import picocli.CommandLine;

import java.io.IOException;
import java.io.PrintWriter;
import java.io.StringWriter;
import java.net.InetAddress;
import java.net.ServerSocket;
import java.net.Socket;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;

import static org.assertj.core.api.Assertions.assertThat;

/** {@code demo-producer} against brokers that are not there or do not answer: one line, exit code 1, bounded time. */
class DemoProducerCommandTest {

    private record Run(int code, String out, String err, Duration took) {
    }

    private static Run run(String... args) {
        CommandLine cl = new CommandLine(new DemoProducerCommand());
        StringWriter out = new StringWriter();
        StringWriter err = new StringWriter();
        cl.setOut(new PrintWriter(out, true));
        cl.setErr(new PrintWriter(err, true));
        long start = System.nanoTime();
        int code = cl.execute(args);
        return new Run(code, out.toString(), err.toString(), Duration.ofNanos(System.nanoTime() - start));
    }

    private static int closedPort() throws IOException {
        try (ServerSocket s = new ServerSocket(0, 1, InetAddress.getLoopbackAddress())) {
            return s.getLocalPort();
        }
    }

    @Test
    @DisplayName("nothing listening at the address: one line naming it, exit code 1, before any record is sent")
    void unreachableBroker() throws IOException {
        String address = "127.0.0.1:" + closedPort();
        Run r = run("--bootstrap-servers", address, "--count", "5");

        assertThat(r.code()).isEqualTo(1);
        assertThat(r.err().lines().toList()).as(r.err()).hasSize(1);
        assertThat(r.err()).contains("cannot reach Kafka", address, "--bootstrap-servers");
        // The connection check waits at most ANSWER_TIMEOUT per address; a refused port answers at once.
        assertThat(r.took()).isLessThan(DemoProducer.ANSWER_TIMEOUT);
    }

    @Test
    @DisplayName("something listening that never answers like Kafka: sending stops after the answer timeout, one line, exit code 1")
    void silentBroker() throws Exception {
        List<Socket> accepted = new ArrayList<>();
        try (ServerSocket silent = new ServerSocket(0, 50, InetAddress.getLoopbackAddress())) {
            Thread acceptor = new Thread(() -> {
                try {
                    while (true) {
                        accepted.add(silent.accept());
                    }
                } catch (IOException closed) {
                    // the test is over
                }
            });
            acceptor.setDaemon(true);
            acceptor.start();
            Run r = run("--bootstrap-servers", "127.0.0.1:" + silent.getLocalPort(), "--count", "1000", "--rate", "0");

            assertThat(r.code()).isEqualTo(1);
            assertThat(r.err().lines().toList()).as(r.err()).hasSize(1);
            assertThat(r.err()).contains("stopped answering", "sending stopped");
            assertThat(r.out()).contains("Sent 1 events");
            // One record waits ANSWER_TIMEOUT for metadata; then sending stops instead of waiting again per record.
            assertThat(r.took()).isLessThan(DemoProducer.ANSWER_TIMEOUT.multipliedBy(3));
        } finally {
            for (Socket s : accepted) {
                s.close();
            }
        }
    }
}
