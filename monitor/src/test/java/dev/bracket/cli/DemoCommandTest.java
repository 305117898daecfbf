package dev.bracket.cli;

import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import picocli.CommandLine;

import java.io.PrintWriter;
import java.io.StringWriter;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

import static org.assertj.core.api.Assertions.assertThat;

/** {@code bracket demo} end to end: a real in-process broker, producer, monitor and HTTP server. */
class DemoCommandTest {

    private record Run(int code, String out, String err) {
    }

    private static Run run(String... args) {
        CommandLine cl = BracketCommand.newCommandLine();
        StringWriter out = new StringWriter();
        StringWriter err = new StringWriter();
        cl.setOut(new PrintWriter(out, true));
        cl.setErr(new PrintWriter(err, true));
        int code = cl.execute(args);
        return new Run(code, out.toString(), err.toString());
    }

    @Test
    @DisplayName("a short demo ends by itself, with every sent event in the final report and the truth inside the worst-case interval")
    void shortDemoRunsToTheEnd() {
        Run r = run("demo", "--duration", "6s", "--rate", "300", "--http-port", "0", "--seed", "3");

        assertThat(r.code()).as(r.err()).isZero();
        Matcher done = Pattern.compile("Demo finished: ([\\d,]+) events sent, ([\\d,]+) in the last report").matcher(r.out());
        assertThat(done.find()).as(r.out()).isTrue();
        long sent = Long.parseLong(done.group(1).replace(",", ""));
        assertThat(sent).isBetween(1_000L, 1_801L);
        assertThat(done.group(2)).isEqualTo(done.group(1));
        // The worst-case interval (Manski 1990) rests on the outcome range alone, so it must hold the true ATE.
        String lastFrame = r.out().substring(r.out().lastIndexOf("Bracket demo - study"));
        assertThat(lastFrame.lines().filter(l -> l.startsWith("worst-case ")).findFirst().orElseThrow()).endsWith("yes");
        assertThat(lastFrame).contains("True ATE", "http://127.0.0.1:", "only as credible as its assumptions");
    }

    @Test
    @DisplayName("out-of-range options are refused with exit code 2 before anything starts")
    void badOptionsAreRefused() {
        Run selection = run("demo", "--selection", "2");
        assertThat(selection.code()).isEqualTo(2);
        assertThat(selection.err()).contains("--selection").contains("[-1, 1]");

        Run port = run("demo", "--http-port", "70000");
        assertThat(port.code()).isEqualTo(2);
        assertThat(port.err()).contains("--http-port must be a TCP port");

        // The earlier name of --http-port still works, and says what it is called now.
        Run earlierName = run("demo", "--port", "70000");
        assertThat(earlierName.code()).isEqualTo(2);
        assertThat(earlierName.err()).contains("--port is now called --http-port").contains("--http-port must be a TCP port");

        Run rate = run("demo", "--rate", "0");
        assertThat(rate.code()).isEqualTo(2);
        assertThat(rate.err()).contains("--rate");
    }
}
