package dev.bracket.cli;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Locale;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

/**
 * Exposure events through {@code replay}: the same pending-aware bounds and bands as {@code calc}
 * given the pending counts, and, without exposure events, today's behaviour with a note.
 */
class PendingReplayTest {

    private static final ObjectMapper JSON = new ObjectMapper();

    @TempDir
    Path dir;

    private Path config() throws Exception {
        Path c = dir.resolve("bracket.yaml");
        Files.writeString(c, """
                studies:
                  - id: registry
                    outcome: {min: 0, max: 1}
                inputs:
                  - topic: events
                """);
        return c;
    }

    /** The example as events: 400 treated exposed, 300 outcomes (270 ones); 700 control, all reported (140 ones). */
    private Path exampleEvents(boolean withExposures) throws Exception {
        StringBuilder out = new StringBuilder();
        int unit = 0;
        for (int i = 0; i < 400; i++, unit++) {
            if (withExposures) {
                out.append(String.format(Locale.ROOT, "{\"kind\":\"exposure\",\"study\":\"registry\",\"unit\":%d,\"treated\":true}%n", unit));
            }
            if (i < 300) {
                out.append(String.format(Locale.ROOT, "{\"study\":\"registry\",\"unit\":%d,\"treated\":true,\"outcome\":%d}%n", unit, i < 270 ? 1 : 0));
            }
        }
        for (int i = 0; i < 700; i++, unit++) {
            if (withExposures) {
                out.append(String.format(Locale.ROOT, "{\"kind\":\"exposure\",\"study\":\"registry\",\"unit\":%d,\"treated\":false}%n", unit));
            }
            out.append(String.format(Locale.ROOT, "{\"study\":\"registry\",\"unit\":%d,\"treated\":false,\"kind\":\"outcome\",\"outcome\":%d}%n",
                    unit, i < 140 ? 1 : 0));
        }
        Path f = dir.resolve(withExposures ? "with.jsonl" : "without.jsonl");
        Files.writeString(f, out.toString());
        return f;
    }

    private static JsonNode row(JsonNode bounds, String set) {
        for (JsonNode row : bounds) {
            if (row.get("assumptions").size() == 1 && row.get("assumptions").get(0).asText().equals(set)) {
                return row;
            }
        }
        throw new AssertionError("no row " + set);
    }

    @Test
    @DisplayName("replay with exposure events equals calc with --treated-pending: intervals and both bands")
    void replayAgreesWithCalc() throws Exception {
        CalcCommandTest.Run replay = CalcCommandTest.run("replay", "--config", config().toString(), "--json",
                exampleEvents(true).toString());
        assertThat(replay.exitCode()).as(replay.err()).isZero();
        JsonNode report = JSON.readTree(replay.out()).get("reports").get(0);
        assertThat(report.get("arms").get("treated").get("pending").asLong()).isEqualTo(100);
        assertThat(report.get("arms").get("control").get("pending").asLong()).isZero();

        // Sample SDs of the binary outcomes, so calc's fixed-horizon band uses the same variances.
        double sd1 = Math.sqrt(0.9 * 0.1 * 300 / 299);
        double sd0 = Math.sqrt(0.2 * 0.8 * 700 / 699);
        CalcCommandTest.Run calc = CalcCommandTest.run("calc", "--min", "0", "--max", "1", "--json",
                "--treated-n", "300", "--treated-mean", "0.9", "--treated-sd", Double.toString(sd1), "--treated-pending", "100",
                "--control-n", "700", "--control-mean", "0.2", "--control-sd", Double.toString(sd0));
        assertThat(calc.exitCode()).as(calc.err()).isZero();
        JsonNode calcBounds = JSON.readTree(calc.out()).get("bounds");

        for (String set : new String[] {"worst-case", "mtr-positive", "mts-positive", "missing-at-random"}) {
            JsonNode r = row(report.get("bounds"), set);
            JsonNode c = row(calcBounds, set);
            assertThat(r.get("lower").asDouble()).as(set).isCloseTo(c.get("lower").asDouble(), within(1e-9));
            assertThat(r.get("upper").asDouble()).as(set).isCloseTo(c.get("upper").asDouble(), within(1e-9));
            for (int b = 0; b < c.get("bands").size(); b++) {
                JsonNode rb = r.get("bands").get(b);
                JsonNode cb = c.get("bands").get(b);
                assertThat(rb.get("method").asText()).isEqualTo(cb.get("method").asText());
                assertThat(rb.get("lower").asDouble()).as(set + " " + cb.get("method")).isCloseTo(cb.get("lower").asDouble(), within(1e-6));
                assertThat(rb.get("upper").asDouble()).as(set + " " + cb.get("method")).isCloseTo(cb.get("upper").asDouble(), within(1e-6));
            }
        }
        // The example, worked by hand over units (see CalcPendingTest).
        assertThat(row(report.get("bounds"), "worst-case").get("lower").asDouble()).isCloseTo(-270.0 / 1100, within(1e-12));
        assertThat(row(report.get("bounds"), "worst-case").get("upper").asDouble()).isCloseTo(930.0 / 1100, within(1e-12));
    }

    @Test
    @DisplayName("without exposure events the bounds are the complete-case ones and the report says pending outcomes are not accounted for")
    void withoutExposuresAsBefore() throws Exception {
        CalcCommandTest.Run replay = CalcCommandTest.run("replay", "--config", config().toString(), "--json",
                exampleEvents(false).toString());
        assertThat(replay.exitCode()).as(replay.err()).isZero();
        JsonNode report = JSON.readTree(replay.out()).get("reports").get(0);
        assertThat(report.get("arms").get("exposuresReported").asBoolean()).isFalse();
        assertThat(report.get("arms").get("pendingNote").asText()).contains("outcomes of units not yet reported are not accounted for");
        // Manski (1990) worst case with p = 0.3, mu1 = 0.9, mu0 = 0.2: [0.3*(0.9-1) - 0.7*0.2, 0.3*0.9 + 0.7*0.8].
        JsonNode worst = row(report.get("bounds"), "worst-case");
        assertThat(worst.get("lower").asDouble()).isCloseTo(0.3 * (0.9 - 1) - 0.7 * 0.2, within(1e-12));
        assertThat(worst.get("upper").asDouble()).isCloseTo(0.3 * 0.9 + 0.7 * 0.8, within(1e-12));
    }

    @Test
    @DisplayName("more outcomes than exposures in an arm is counted as a data-quality finding, not an error")
    void excessOutcomesCounted() throws Exception {
        Path f = dir.resolve("excess.jsonl");
        Files.writeString(f, """
                {"kind":"exposure","study":"registry","unit":1,"treated":true}
                {"study":"registry","unit":1,"treated":true,"outcome":1}
                {"study":"registry","unit":2,"treated":true,"outcome":0}
                {"kind":"exposure","study":"registry","unit":3,"treated":false}
                {"study":"registry","unit":3,"treated":false,"outcome":0}
                {"kind":"later","study":"registry","unit":4,"treated":false}
                """);
        CalcCommandTest.Run replay = CalcCommandTest.run("replay", "--config", config().toString(), "--json", f.toString());
        assertThat(replay.exitCode()).as(replay.err()).isZero();
        JsonNode doc = JSON.readTree(replay.out());
        JsonNode arms = doc.get("reports").get(0).get("arms");
        assertThat(arms.get("treated").get("excessOutcomes").asLong()).isEqualTo(1);
        assertThat(arms.get("treated").get("pending").asLong()).isZero();
        assertThat(doc.get("rejected").get("byReason").get("wrong-type").asLong()).isEqualTo(1);
        assertThat(replay.err()).contains("'kind' must be \"exposure\" or \"outcome\"");
    }
}
