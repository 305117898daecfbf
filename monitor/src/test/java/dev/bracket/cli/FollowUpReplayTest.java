package dev.bracket.cli;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

import java.nio.file.Files;
import java.nio.file.Path;

import static org.assertj.core.api.Assertions.assertThat;

/** A study's follow-up horizon through {@code replay}: units pending longer than it are lost to follow-up. */
class FollowUpReplayTest {

    private static final ObjectMapper JSON = new ObjectMapper();

    @TempDir
    Path dir;

    @Test
    @DisplayName("pending units exposed more than the horizon ago are lost; recent ones and reported ones are not")
    void lostAfterTheHorizon() throws Exception {
        CalcCommandTest.Run run = replayWithTenDayHorizon(true, """
                {"kind":"exposure","study":"registry","unit":1,"treated":true,"time":"2026-01-01T00:00:00Z"}
                {"kind":"exposure","study":"registry","unit":2,"treated":true,"time":"2026-01-01T00:00:00Z"}
                {"kind":"exposure","study":"registry","unit":3,"treated":false,"time":"2026-01-01T00:00:00Z"}
                {"kind":"exposure","study":"registry","unit":4,"treated":false,"time":"2026-01-01T00:00:00Z"}
                {"study":"registry","unit":1,"treated":true,"outcome":1,"time":"2026-01-05T00:00:00Z","exposed":"2026-01-01T00:00:00Z"}
                {"study":"registry","unit":3,"treated":false,"outcome":0,"time":"2026-01-03T00:00:00Z","exposed":"2026-01-01T00:00:00Z"}
                {"kind":"exposure","study":"registry","unit":5,"treated":true,"time":"2026-01-29T00:00:00Z"}
                {"kind":"exposure","study":"registry","unit":6,"treated":false,"time":"2026-01-30T00:00:00Z"}
                """);
        assertThat(run.exitCode()).as(run.err()).isZero();
        JsonNode report = JSON.readTree(run.out()).get("reports").get(0);
        // Watermark 2026-01-30: units 2 (treated) and 4 (control), exposed on 01-01 and never reported, are lost;
        // units 5 and 6 (exposed 01-29 and 01-30) are pending, not lost.
        JsonNode lost = report.get("lostToFollowUp");
        assertThat(lost.get("horizon").asText()).isEqualTo("PT240H");
        assertThat(lost.get("treated").asLong()).isEqualTo(1);
        assertThat(lost.get("control").asLong()).isEqualTo(1);
        assertThat(report.get("arms").get("treated").get("pending").asLong()).isEqualTo(2);
        assertThat(lost.get("treatedShare").asDouble()).isEqualTo(1.0 / 3);
        assertThat(lost.get("controlShare").asDouble()).isEqualTo(1.0 / 3);
        // Lost units stay bounded by [0, 1] like pending ones (Horowitz & Manski 2000, worst case over units):
        // of 6 units only unit 1's Y1 and unit 3's Y0 are known, so E[Y1] and E[Y0] each range over 5/6:
        // width 10/6.
        JsonNode worst = report.get("bounds").get(0);
        assertThat(worst.get("upper").asDouble() - worst.get("lower").asDouble())
                .isCloseTo(10.0 / 6, org.assertj.core.api.Assertions.within(1e-12));
    }

    @Test
    @DisplayName("the text report names the lost units per arm with their shares")
    void lostInTheTextReport() throws Exception {
        CalcCommandTest.Run run = replayWithTenDayHorizon(false, """
                {"kind":"exposure","study":"registry","unit":1,"treated":true,"time":"2026-01-01T00:00:00Z"}
                {"kind":"exposure","study":"registry","unit":2,"treated":true,"time":"2026-01-01T00:00:00Z"}
                {"kind":"exposure","study":"registry","unit":3,"treated":false,"time":"2026-01-01T00:00:00Z"}
                {"study":"registry","unit":1,"treated":true,"outcome":1,"time":"2026-01-05T00:00:00Z","exposed":"2026-01-01T00:00:00Z"}
                {"study":"registry","unit":3,"treated":false,"outcome":0,"time":"2026-01-03T00:00:00Z","exposed":"2026-01-01T00:00:00Z"}
                {"kind":"exposure","study":"registry","unit":4,"treated":false,"time":"2026-01-30T00:00:00Z"}
                """);
        assertThat(run.exitCode()).as(run.err()).isZero();
        // Unit 2 (treated, exposed 01-01, never reported) is lost by the 01-30 watermark: 1 of 2 treated units;
        // no control unit is lost (unit 3 reported, unit 4 exposed a day before the watermark).
        assertThat(run.out()).contains(
                "Lost to follow-up (still pending 10d after exposure): treated 1 (50.0% of its units), control 0 (0.0% of its units).");
    }

    /** {@code replay} (with {@code --json} or the text report) of these events for a study with a 10-day follow-up horizon. */
    private CalcCommandTest.Run replayWithTenDayHorizon(boolean json, String lines) throws Exception {
        Path config = dir.resolve("bracket.yaml");
        Files.writeString(config, """
                studies:
                  - id: registry
                    outcome: {min: 0, max: 1}
                    follow-up: 10d
                    assume: [worst-case]
                inputs:
                  - topic: events
                bands: none
                """);
        Path events = dir.resolve("events.jsonl");
        Files.writeString(events, lines);
        return json ? CalcCommandTest.run("replay", "--config", config.toString(), "--json", events.toString())
                : CalcCommandTest.run("replay", "--config", config.toString(), events.toString());
    }

    @Test
    @DisplayName("without a horizon the field is null; a bad horizon names the key")
    void noHorizon() throws Exception {
        Path config = dir.resolve("b.yaml");
        Files.writeString(config, """
                studies:
                  - id: registry
                    outcome: {min: 0, max: 1}
                inputs:
                  - topic: events
                """);
        Path events = dir.resolve("e.jsonl");
        Files.writeString(events, "{\"study\":\"registry\",\"unit\":1,\"treated\":true,\"outcome\":1}\n");
        CalcCommandTest.Run run = CalcCommandTest.run("replay", "--config", config.toString(), "--json", events.toString());
        assertThat(JSON.readTree(run.out()).get("reports").get(0).get("lostToFollowUp").isNull()).isTrue();
        Files.writeString(config, Files.readString(config).replace("outcome: {min: 0, max: 1}", "outcome: {min: 0, max: 1}\n    follow-up: 0s"));
        CalcCommandTest.Run bad = CalcCommandTest.run("replay", "--config", config.toString(), events.toString());
        assertThat(bad.exitCode()).isNotZero();
        assertThat(bad.err()).contains("follow-up");
    }
}
