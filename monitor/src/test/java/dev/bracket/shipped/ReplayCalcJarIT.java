package dev.bracket.shipped;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

/** {@code replay} and {@code calc} from the packaged jar. */
@DisplayName("bracket.jar replay and calc")
class ReplayCalcJarIT {

    /**
     * Five events and two lines that are not JSON (a form feed, a vertical tab: not JSON whitespace,
     * RFC 8259 section 2), with every line end and blank line: treated outcomes 0.8 and 0.6,
     * control 0.5, 0.3 and 0.1.
     */
    static final String MIXED_LINE_ENDS = "{\"study\":\"host-rollout\",\"unit\":1,\"treated\":true,\"outcome\":0.8}\r\n"
            + "{\"study\":\"host-rollout\",\"unit\":2,\"treated\":true,\"outcome\":0.6}\r"
            + "{\"study\":\"host-rollout\",\"unit\":3,\"treated\":false,\"outcome\":0.5}\n"
            + "\n"
            + " \t\r\n"
            + "{\"study\":\"host-rollout\",\"unit\":4,\"treated\":false,\"outcome\":0.3}\n"
            + "\f\n"
            + "\u000B\n"
            + "{\"study\":\"host-rollout\",\"unit\":5,\"treated\":false,\"outcome\":0.1}";

    @TempDir
    Path dir;

    @Test
    @DisplayName("replay reads a file with CRLF, lone CR, blank, form-feed and vertical-tab lines: 5 events, 2 rejected with their lines, worst-case bounds")
    void replayMixedFile() throws Exception {
        Path config = Files.writeString(dir.resolve("bracket.yaml"),
                "studies:\n  - id: host-rollout\n    outcome: {min: 0, max: 1}\n    assume: [[worst-case]]\n");
        Path events = Files.writeString(dir.resolve("mixed.jsonl"), MIXED_LINE_ENDS);
        try (JarProcess replay = JarProcess.start(dir, "replay", "replay", "--config", config.toString(), "--json", events.toString())) {
            assertThat(replay.awaitExit(Duration.ofSeconds(60))).as(replay.err()).isZero();
            JsonNode doc = new ObjectMapper().readTree(replay.out());
            assertThat(doc.path("accepted").asLong()).isEqualTo(5);
            assertThat(doc.path("rejected").path("byReason").path("bad-json").asLong()).isEqualTo(2);
            // Lines: 1 CRLF, 2 CR, 3 LF, 4 empty, 5 spaces and tab, 6 event, 7 form feed, 8 vertical tab, 9 event.
            assertThat(replay.err()).contains(events + ":7: rejected (bad-json)", events + ":8: rejected (bad-json)");
            JsonNode report = doc.path("reports").get(0);
            assertThat(report.path("window").asText()).isEqualTo("cumulative");
            MonitorJarIT.checkWorstCase(report);
            // By hand (Manski 1990): p = 2/5, mu1 = 0.7, mu0 = 0.3: [0.28 - 0.4 - 0.18, 0.28 + 0.6 - 0.18] = [-0.30, 0.70].
            JsonNode row = report.path("bounds").get(0);
            assertThat(row.path("lower").asDouble()).isCloseTo(-0.30, within(1e-12));
            assertThat(row.path("upper").asDouble()).isCloseTo(0.70, within(1e-12));
        }
    }

    @Test
    @DisplayName("a configuration with a key given twice is refused: file:line:column, exit code 2")
    void configurationErrorExitCode() throws Exception {
        Path config = Files.writeString(dir.resolve("twice.yaml"),
                "studies:\n  - id: s\n    outcome: {min: 0, max: 1}\ngrace: 1s\ngrace: 2s\n");
        Path events = Files.writeString(dir.resolve("none.jsonl"), "");
        try (JarProcess replay = JarProcess.start(dir, "twice", "replay", "--config", config.toString(), events.toString())) {
            assertThat(replay.awaitExit(Duration.ofSeconds(60))).isEqualTo(2);
            assertThat(replay.err().strip()).isEqualTo("replay: " + config + ":5:1: grace is given twice in one mapping"
                    + " (first at line 4, column 1); keep one");
        }
    }

    @Test
    @DisplayName("calc: the worst-case interval of summary statistics, as JSON")
    void calcWorstCase() throws Exception {
        try (JarProcess calc = JarProcess.start(dir, "calc", "calc", "--min", "0", "--max", "1", "--treated-n", "400",
                "--treated-mean", "0.62", "--control-n", "600", "--control-mean", "0.48", "--assume", "worst-case", "--json")) {
            assertThat(calc.awaitExit(Duration.ofSeconds(60))).as(calc.err()).isZero();
            JsonNode row = new ObjectMapper().readTree(calc.out()).path("bounds").get(0);
            // Manski (1990) with p = 0.4: lower = 0.4*0.62 - 0.4 - 0.6*0.48 = -0.44; upper = 0.4*0.62 + 0.6 - 0.6*0.48 = 0.56.
            assertThat(row.path("lower").asDouble()).isCloseTo(-0.44, within(1e-12));
            assertThat(row.path("upper").asDouble()).isCloseTo(0.56, within(1e-12));
        }
    }
}
