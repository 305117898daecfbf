package dev.bracket.cli;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import org.apache.commons.math3.stat.descriptive.SummaryStatistics;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

import java.nio.file.Files;
import java.nio.file.Path;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

/** {@code bracket replay} through the real command line. */
class ReplayCommandTest {

    private static final ObjectMapper JSON = new ObjectMapper();

    @TempDir
    Path dir;

    private Path config() throws Exception {
        Path c = dir.resolve("bracket.yaml");
        Files.writeString(c, """
                studies:
                  - id: checkout
                    outcome: {min: 0, max: 1, better: lower}
                    assume: [[worst-case], [mtr-negative, mts-negative]]
                inputs:
                  - topic: outcomes
                    fields: {treated: canary}
                bands: none
                """);
        return c;
    }

    @Test
    @DisplayName("replay reads several files, uses the topic's field names and reports rejected lines with file and line")
    void replaysFilesAndListsRejectedLines() throws Exception {
        Path a = dir.resolve("a.jsonl");
        Path b = dir.resolve("b.jsonl");
        Files.writeString(a, """
                {"study":"checkout","unit":"h1","canary":true,"outcome":0}
                {"study":"checkout","unit":"h2","canary":false,"outcome":1}

                {"study":"checkout","unit":"h3","canary":false,"outcome":0}
                """);
        Files.writeString(b, """
                {"study":"checkout","unit":"h4","canary":true,"outcome":1}\r
                {"study":"checkout","unit":"h5","canary":true,"outcome":3}
                not json""");
        CalcCommandTest.Run run = CalcCommandTest.run("replay", "--config", config().toString(), "--json", a.toString(), b.toString());

        assertThat(run.exitCode()).isZero();
        JsonNode doc = JSON.readTree(run.out());
        assertThat(doc.get("accepted").asLong()).isEqualTo(4);
        assertThat(doc.get("rejected").get("byReason").get("out-of-range").asLong()).isEqualTo(1);
        assertThat(doc.get("rejected").get("byReason").get("bad-json").asLong()).isEqualTo(1);
        JsonNode report = doc.get("reports").get(0);
        assertThat(report.get("study").asText()).isEqualTo("checkout");
        assertThat(report.get("window").asText()).isEqualTo("cumulative");
        assertThat(report.get("arms").get("treated").get("n").asLong()).isEqualTo(2);
        assertThat(report.get("arms").get("control").get("mean").asDouble()).isEqualTo(0.5);
        // Worst case (Manski 1990): p = 1/2, mu1 = 1/2, mu0 = 1/2, outcomes in [0, 1]:
        // [p*mu1 + (1-p)*0 - (1-p)*mu0 - p*1, p*mu1 + (1-p)*1 - (1-p)*mu0 - p*0] = [-0.5, 0.5].
        JsonNode worst = report.get("bounds").get(0);
        assertThat(worst.get("lower").asDouble()).isCloseTo(-0.5, within(1e-15));
        assertThat(worst.get("upper").asDouble()).isCloseTo(0.5, within(1e-15));
        assertThat(run.err()).contains(b + ":2: rejected (out-of-range): outcome 3.0 lies outside [0.0, 1.0]")
                .contains(b + ":3: rejected (bad-json)")
                .contains("rejected 2 line(s): bad-json 1, out-of-range 1");
    }

    @Test
    @DisplayName("the table form shows each study and window with the caution")
    void printsTables() throws Exception {
        Path a = dir.resolve("a.jsonl");
        SummaryStatistics treated = new SummaryStatistics();
        StringBuilder lines = new StringBuilder();
        for (int i = 0; i < 50; i++) {
            double y = (i % 7) / 7.0;
            boolean t = i % 3 == 0;
            if (t) {
                treated.addValue(y);
            }
            lines.append("{\"study\":\"checkout\",\"unit\":").append(i).append(",\"canary\":").append(t ? 1 : 0)
                    .append(",\"outcome\":").append(y).append("}\n");
        }
        Files.writeString(a, lines);
        CalcCommandTest.Run run = CalcCommandTest.run("replay", "--config", config().toString(), a.toString());
        assertThat(run.exitCode()).isZero();
        assertThat(run.out()).contains("50 event(s) used, 0 rejected")
                .contains("== study checkout, window cumulative (all events)")
                .contains(String.format(java.util.Locale.ROOT, "treated  n=%d, mean=%.6f", treated.getN(), treated.getMean()))
                .contains("only as credible as its assumptions");
        assertThat(run.err()).isEmpty();
    }

    @Test
    @DisplayName("bad command input is one clear line and exit code 2")
    void badInputExitsWithTwo() throws Exception {
        Path config = config();
        CalcCommandTest.Run missing = CalcCommandTest.run("replay", "--config", config.toString(), dir.resolve("nope.jsonl").toString());
        assertThat(missing.exitCode()).isEqualTo(2);
        assertThat(missing.errLines()).containsExactly("replay: " + dir.resolve("nope.jsonl") + ": no such file or not readable");

        Path broken = dir.resolve("broken.yaml");
        Files.writeString(broken, "studies:\n  - id: x\n    outcome: {min: 1, max: 0}\n");
        CalcCommandTest.Run badConfig = CalcCommandTest.run("replay", "--config", broken.toString(), "-");
        assertThat(badConfig.exitCode()).isEqualTo(2);
        assertThat(badConfig.errLines()).containsExactly("replay: " + broken + ":3:28: studies[0].outcome.max must be greater than min (1.0)");

        CalcCommandTest.Run badTopic = CalcCommandTest.run("replay", "--config", config.toString(), "--fields-of", "other", "-");
        assertThat(badTopic.exitCode()).isEqualTo(2);
        assertThat(badTopic.errLines()).hasSize(1).first().asString().contains("--fields-of 'other' is not an input topic");

        CalcCommandTest.Run noConfig = CalcCommandTest.run("monitor", "--config", dir.resolve("absent.yaml").toString());
        assertThat(noConfig.exitCode()).isEqualTo(2);
        assertThat(noConfig.errLines()).containsExactly("monitor: " + dir.resolve("absent.yaml") + ": no such configuration file");
    }
}
