package dev.bracket.cli;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

import java.nio.file.Files;
import java.nio.file.Path;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

/**
 * {@code bracket replay} of a binary-outcome study with an independent instrument: the events'
 * cell counts give the sharp bounds with their bands, and an outcome that is neither end of the
 * range is rejected as not binary.
 */
class ReplayIndependentInstrumentTest {

    private static final ObjectMapper JSON = new ObjectMapper();

    @TempDir
    Path dir;

    @Test
    void replayReportsTheSharpBoundsAndRejectsNonBinaryOutcomes() throws Exception {
        Path config = dir.resolve("bracket.yaml");
        Files.writeString(config, """
                studies:
                  - id: encouragement
                    outcome: {min: 0, max: 1, kind: binary}
                    instrument: independent
                    assume: [[worst-case]]
                """);
        // The construction of bounds.IndependenceNarrowerThanMeanIndependenceTest (ours, not published):
        // counts (treated Y=0, treated Y=1, untreated Y=0, untreated Y=1) = (50, 400, 550, 0) at z0, (450, 100, 450, 0) at z1.
        StringBuilder events = new StringBuilder();
        int unit = 0;
        int[][] counts = {{50, 400, 550, 0}, {450, 100, 450, 0}};
        for (int z = 0; z < 2; z++) {
            for (int cell = 0; cell < 4; cell++) {
                for (int i = 0; i < counts[z][cell]; i++) {
                    events.append(String.format("{\"study\":\"encouragement\",\"unit\":%d,\"treated\":%b,\"outcome\":%d,\"instrument\":\"z%d\"}%n",
                            unit++, cell < 2, cell % 2, z));
                }
            }
        }
        events.append("{\"study\":\"encouragement\",\"unit\":\"x\",\"treated\":true,\"outcome\":0.5,\"instrument\":\"z0\"}\n");
        Path file = dir.resolve("events.jsonl");
        Files.writeString(file, events);

        CalcCommandTest.Run run = CalcCommandTest.run("replay", "--config", config.toString(), "--json", file.toString());

        assertThat(run.exitCode()).as(run.err()).isZero();
        JsonNode doc = JSON.readTree(run.out());
        assertThat(doc.get("accepted").asLong()).isEqualTo(2000);
        assertThat(doc.get("rejected").get("byReason").get("not-binary").asLong()).isEqualTo(1);
        assertThat(run.err()).contains("neither 0.0 nor 1.0");
        JsonNode row = doc.get("reports").get(0).get("bounds").get(0);
        assertThat(row.get("instrument").asText()).isEqualTo("independent");
        // Balke & Pearl (1997) bounds of the construction, worked by hand in the bounds test: [0.25, 0.55].
        assertThat(row.get("lower").asDouble()).isCloseTo(0.25, within(1e-9));
        assertThat(row.get("upper").asDouble()).isCloseTo(0.55, within(1e-9));
        assertThat(row.get("bands")).hasSize(2);
        for (JsonNode band : row.get("bands")) {
            assertThat(band.get("lower").asDouble()).isLessThanOrEqualTo(0.25);
            assertThat(band.get("upper").asDouble()).isGreaterThanOrEqualTo(0.55);
        }
    }
}
