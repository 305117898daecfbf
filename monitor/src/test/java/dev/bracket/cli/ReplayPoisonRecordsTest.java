package dev.bracket.cli;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

import java.nio.file.Files;
import java.nio.file.Path;

import static org.assertj.core.api.Assertions.assertThat;

/** {@code bracket replay} on the records that once stopped the monitor: each is rejected with a reason, exit code 0. */
class ReplayPoisonRecordsTest {

    private static final ObjectMapper JSON = new ObjectMapper();

    @TempDir
    Path dir;

    @Test
    @DisplayName("replay rejects a time beyond epoch milliseconds and a year-9999 time with their reasons and exits 0")
    void rejectsPoisonAndExitsZero() throws Exception {
        Path config = dir.resolve("bracket.yaml");
        Files.writeString(config, """
                studies:
                  - id: s1
                    outcome: {min: 0, max: 1}
                    assume: [[worst-case]]
                windows:
                  - {name: hourly, kind: tumbling, size: 1h}
                bands: none
                """);
        Path events = dir.resolve("events.jsonl");
        Files.writeString(events, """
                {"study":"s1","unit":1,"treated":true,"outcome":0.5,"time":"2025-03-01T10:15:00Z"}
                {"study":"s1","unit":1,"treated":true,"outcome":0.5,"time":"+999999999-12-31T23:59:59Z"}
                {"study":"s1","unit":2,"treated":false,"outcome":0.25,"time":"2025-03-01T10:20:00Z"}
                {"study":"s1","unit":3,"treated":true,"outcome":0.5,"time":"9999-12-31T23:59:59Z"}
                {"study":"s1","unit":4,"treated":false,"outcome":0.75,"time":1740824400000}
                """);
        CalcCommandTest.Run run = CalcCommandTest.run("replay", "--config", config.toString(), "--json", events.toString());

        assertThat(run.exitCode()).isZero();
        JsonNode doc = JSON.readTree(run.out());
        assertThat(doc.get("accepted").asLong()).isEqualTo(3);
        assertThat(doc.get("rejected").get("byReason").get("time-unrepresentable").asLong()).isEqualTo(1);
        assertThat(doc.get("rejected").get("byReason").get("time-too-far-ahead").asLong()).isEqualTo(1);
        assertThat(run.err()).contains(events + ":2: rejected (time-unrepresentable)")
                .contains(events + ":4: rejected (time-too-far-ahead)");
        // The year-9999 event did not become the watermark: the hourly window is 2025-03-01 10:00-11:00 with all three events.
        for (JsonNode report : doc.get("reports")) {
            if (report.get("window").asText().equals("hourly")) {
                assertThat(report.get("arms").get("treated").get("n").asLong() + report.get("arms").get("control").get("n").asLong())
                        .isEqualTo(3);
            }
        }
    }
}
