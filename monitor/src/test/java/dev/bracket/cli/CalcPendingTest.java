package dev.bracket.cli;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** {@code calc} with pending outcomes: {@code --treated-pending}, {@code --control-pending} and the CSV column. */
class CalcPendingTest {

    private static final ObjectMapper JSON = new ObjectMapper();

    private static final String[] EXAMPLE = {"calc", "--min", "0", "--max", "1",
            "--treated-n", "300", "--treated-mean", "0.9", "--treated-pending", "100",
            "--control-n", "700", "--control-mean", "0.2", "--json"};

    @Test
    @DisplayName("the example: worst case [-0.245455, 0.845455], worked out by hand over 1100 units")
    void exampleByHand() throws IOException {
        CalcCommandTest.Run r = CalcCommandTest.run(EXAMPLE);
        assertEquals(0, r.exitCode(), r.err());
        JsonNode doc = JSON.readTree(r.out());
        JsonNode worst = row(doc, "worst-case");
        // Horowitz & Manski (2000) worst case over units: every unknown outcome at 0 or 1.
        // Lowest ATE: E[Y1] = 270/1100 (observed successes only), E[Y0] = (140 + 400)/1100 -> -270/1100.
        // Highest ATE: E[Y1] = (270 + 100 + 700)/1100, E[Y0] = 140/1100 -> 930/1100.
        assertEquals(-270.0 / 1100, worst.get("lower").asDouble(), 1e-12);
        assertEquals(930.0 / 1100, worst.get("upper").asDouble(), 1e-12);
        assertEquals(-0.245455, worst.get("lower").asDouble(), 5e-7);
        assertEquals(0.845455, worst.get("upper").asDouble(), 5e-7);
        assertEquals("in-range", worst.get("pendingOutcomes").asText());

        JsonNode mar = row(doc, "missing-at-random");
        assertEquals("missing-at-random", mar.get("pendingOutcomes").asText());
        // Complete-case means 0.9 and 0.2 with p = 400/1100 (Manski 1990 worst-case formula).
        double p = 400.0 / 1100;
        assertEquals(p * (0.9 - 1) - (1 - p) * 0.2, mar.get("lower").asDouble(), 1e-12);

        JsonNode treated = doc.get("arms").get("treated");
        assertEquals(300, treated.get("n").asLong());
        assertEquals(100, treated.get("pending").asLong());
        assertEquals(0.25, treated.get("pendingShare").asDouble(), 1e-12);
        assertEquals(0, doc.get("arms").get("control").get("pending").asLong());
        assertTrue(doc.get("arms").get("exposuresReported").asBoolean());
        assertEquals(p, doc.get("arms").get("treatedShare").asDouble(), 1e-12);
    }

    @Test
    @DisplayName("the CSV pending column gives the same rows as the flags")
    void csvColumnMatchesFlags(@TempDir Path dir) throws IOException {
        Path csv = dir.resolve("cells.csv");
        Files.writeString(csv, """
                arm,n,mean,pending
                treated,300,0.9,100
                control,700,0.2,
                """, StandardCharsets.UTF_8);
        CalcCommandTest.Run fromFile = CalcCommandTest.run("calc", "--min", "0", "--max", "1", "--cells", csv.toString(), "--json");
        CalcCommandTest.Run fromFlags = CalcCommandTest.run(EXAMPLE);
        assertEquals(0, fromFile.exitCode(), fromFile.err());
        assertEquals(JSON.readTree(fromFlags.out()).get("bounds").get(0).get("lower"),
                JSON.readTree(fromFile.out()).get("bounds").get(0).get("lower"));
        assertEquals(JSON.readTree(fromFlags.out()).get("bounds"), JSON.readTree(fromFile.out()).get("bounds"));
    }

    @Test
    @DisplayName("without pending counts the table says outcomes of units not yet reported are not accounted for")
    void withoutExposuresTheTableSaysSo() {
        CalcCommandTest.Run r = CalcCommandTest.run("calc", "--min", "0", "--max", "1", "--treated-n", "30",
                "--treated-mean", "0.5", "--control-n", "30", "--control-mean", "0.4", "--assume", "worst-case");
        assertEquals(0, r.exitCode(), r.err());
        assertTrue(r.out().contains("outcomes of units not yet reported are not accounted for"), r.out());
        assertFalse(r.out().contains("pending="), r.out());
    }

    @Test
    @DisplayName("a negative pending count is one error line naming the flag; a bad CSV value names file and line")
    void badPendingCounts(@TempDir Path dir) throws IOException {
        CalcCommandTest.Run r = CalcCommandTest.run("calc", "--min", "0", "--max", "1", "--treated-n", "3",
                "--treated-mean", "0.5", "--treated-pending", "-2", "--control-n", "3", "--control-mean", "0.4");
        assertEquals(2, r.exitCode(), r.err());
        assertTrue(r.err().contains("--treated-pending"), r.err());
        Path csv = dir.resolve("bad.csv");
        Files.writeString(csv, "arm,n,mean,pending\ntreated,3,0.5,x\ncontrol,3,0.4,0\n", StandardCharsets.UTF_8);
        CalcCommandTest.Run f = CalcCommandTest.run("calc", "--min", "0", "--max", "1", "--cells", csv.toString());
        assertEquals(2, f.exitCode(), f.err());
        assertTrue(f.err().contains("line 2") && f.err().contains("pending"), f.err());
    }

    private static JsonNode row(JsonNode doc, String set) {
        for (JsonNode row : doc.get("bounds")) {
            if (row.get("assumptions").size() == 1 && row.get("assumptions").get(0).asText().equals(set)) {
                return row;
            }
        }
        throw new AssertionError("no row " + set + " in " + doc);
    }
}
