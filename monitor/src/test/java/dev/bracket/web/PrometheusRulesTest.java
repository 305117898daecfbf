package dev.bracket.web;

import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.concurrent.TimeUnit;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.fail;
import static org.assertj.core.api.Assumptions.assumeThat;

/**
 * The shipped Prometheus alerting rules ({@code dashboards/prometheus/bracket-rules.yml}), checked
 * and unit-tested by Prometheus's own {@code promtool} (Debian's {@code prometheus} package): the
 * cases in {@code bracket-rules.test.yml} say which alert fires when, with which labels and text.
 * Without {@code promtool} the test fails with the install command; {@code -Dbracket.promtool.skip=true}
 * skips it on a machine without it.
 */
@DisplayName("Prometheus alerting rules pass promtool's checks and unit tests")
class PrometheusRulesTest {

    private static final Path RULES_DIR = Path.of("..", "dashboards", "prometheus");

    @Test
    @DisplayName("promtool check rules and promtool test rules succeed")
    void rulesPassPromtool() throws Exception {
        String promtool = promtool();
        assertThat(run(List.of(promtool, "check", "rules", "bracket-rules.yml"))).contains("SUCCESS");
        assertThat(run(List.of(promtool, "test", "rules", "bracket-rules.test.yml"))).contains("SUCCESS");
    }

    private static String promtool() {
        for (String dir : System.getenv().getOrDefault("PATH", "/usr/bin").split(":")) {
            Path p = Path.of(dir, "promtool");
            if (Files.isExecutable(p)) {
                return p.toString();
            }
        }
        assumeThat(Boolean.getBoolean("bracket.promtool.skip")).as("bracket.promtool.skip=true and no promtool on PATH").isFalse();
        return fail("promtool is not on PATH. Install it with: sudo apt-get update && sudo apt-get install -y prometheus"
                + " (or pass -Dbracket.promtool.skip=true to skip this test on this machine).");
    }

    /** Runs a command in the rules directory; fails with its output unless it exits with 0. */
    private static String run(List<String> command) throws IOException, InterruptedException {
        Process p = new ProcessBuilder(command).directory(RULES_DIR.toFile()).redirectErrorStream(true).start();
        if (!p.waitFor(60, TimeUnit.SECONDS)) {
            p.destroyForcibly();
            fail(String.join(" ", command) + " did not finish within 60 s");
        }
        String out = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
        assertThat(p.exitValue()).as(String.join(" ", command) + " printed:\n" + out).isZero();
        return out;
    }
}
