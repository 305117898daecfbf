package dev.bracket.cli;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** {@code bracket calc --outcome-kind} and {@code --instrument} through the real command line. */
class CalcInstrumentTest {

    private static final ObjectMapper JSON = new ObjectMapper();

    /**
     * The two-level construction of {@code bounds.IndependenceNarrowerThanMeanIndependenceTest}
     * (our own, not published): 1000 units per level.
     */
    private static Path construction(Path dir) throws IOException {
        Path csv = dir.resolve("two-sided.csv");
        Files.writeString(csv, "instrument,arm,n,mean\n"
                + "z0,treated,450," + (400.0 / 450) + "\n"
                + "z0,control,550,0\n"
                + "z1,treated,550," + (100.0 / 550) + "\n"
                + "z1,control,450,0\n", StandardCharsets.UTF_8);
        return csv;
    }

    @Test
    void independentInstrumentGivesTheSharpBoundsAndSaysSoInJson(@TempDir Path dir) throws IOException {
        Path csv = construction(dir);
        CalcCommandTest.Run mean = CalcCommandTest.run("calc", "--min", "0", "--max", "1", "--outcome-kind", "binary",
                "--cells", csv.toString(), "--assume", "worst-case", "--json");
        CalcCommandTest.Run independent = CalcCommandTest.run("calc", "--min", "0", "--max", "1", "--outcome-kind", "binary",
                "--instrument", "independent", "--cells", csv.toString(), "--assume", "worst-case", "--json");
        assertEquals(0, mean.exitCode(), mean.err());
        assertEquals(0, independent.exitCode(), independent.err());
        JsonNode m = JSON.readTree(mean.out());
        JsonNode i = JSON.readTree(independent.out());
        assertEquals("binary", i.get("outcome").get("kind").asText());
        JsonNode mRow = m.get("bounds").get(0);
        JsonNode iRow = i.get("bounds").get(0);
        assertEquals("mean-independent", mRow.get("instrument").asText());
        assertEquals("independent", iRow.get("instrument").asText());
        // Manski (1990) by hand: [-0.05, 0.55]; Balke & Pearl (1997): [0.25, 0.55] (see the bounds test).
        assertEquals(-0.05, mRow.get("lower").asDouble(), 1e-9);
        assertEquals("undetermined", mRow.get("sign").asText());
        assertEquals(0.25, iRow.get("lower").asDouble(), 1e-9);
        assertEquals(0.55, iRow.get("upper").asDouble(), 1e-9);
        assertEquals("positive", iRow.get("sign").asText());
        // Bands around it: two methods, each holding the interval.
        assertEquals(2, iRow.get("bands").size());
        for (JsonNode band : iRow.get("bands")) {
            assertTrue(band.get("lower").asDouble() <= 0.25 && band.get("upper").asDouble() >= 0.55, band.toString());
        }
    }

    @Test
    void tableHasAnInstrumentColumnAndExplainsIt(@TempDir Path dir) throws IOException {
        CalcCommandTest.Run r = CalcCommandTest.run("calc", "--min", "0", "--max", "1", "--outcome-kind", "binary",
                "--instrument", "independent", "--cells", construction(dir).toString(), "--assume", "worst-case");
        assertEquals(0, r.exitCode(), r.err());
        assertTrue(r.out().lines().anyMatch(l -> l.startsWith("assumptions") && l.contains("instrument")), r.out());
        assertTrue(r.out().lines().anyMatch(l -> l.startsWith("worst-case") && l.contains("independent") && l.contains("0.250000")), r.out());
        assertTrue(r.out().contains("instrument independent: "), r.out());
        assertTrue(r.out().contains("binary"), r.out());
    }

    @Test
    void withoutInstrumentLevelsTheJsonSaysNone() throws IOException {
        CalcCommandTest.Run r = CalcCommandTest.run("calc", "--min", "0", "--max", "1", "--treated-n", "40", "--treated-mean", "0.5",
                "--control-n", "60", "--control-mean", "0.25", "--assume", "worst-case", "--json");
        assertEquals(0, r.exitCode(), r.err());
        assertTrue(JSON.readTree(r.out()).get("bounds").get(0).get("instrument").isNull());
        assertEquals("bounded", JSON.readTree(r.out()).get("outcome").get("kind").asText());
    }

    @Test
    void independentWithoutBinaryOutcomeIsAClearError(@TempDir Path dir) throws IOException {
        CalcCommandTest.Run r = CalcCommandTest.run("calc", "--min", "0", "--max", "1", "--instrument", "independent",
                "--cells", construction(dir).toString());
        assertEquals(2, r.exitCode());
        assertEquals(1, r.errLines().size(), r.err());
        assertTrue(r.err().contains("--instrument independent needs --outcome-kind binary"), r.err());
    }

    @Test
    void unknownValuesNameTheFlag(@TempDir Path dir) throws IOException {
        CalcCommandTest.Run kind = CalcCommandTest.run("calc", "--min", "0", "--max", "1", "--outcome-kind", "count",
                "--cells", construction(dir).toString());
        assertEquals(2, kind.exitCode());
        assertTrue(kind.err().contains("--outcome-kind must be 'bounded' or 'binary', was 'count'"), kind.err());
        CalcCommandTest.Run instrument = CalcCommandTest.run("calc", "--min", "0", "--max", "1", "--outcome-kind", "binary",
                "--instrument", "strong", "--cells", construction(dir).toString());
        assertEquals(2, instrument.exitCode());
        assertTrue(instrument.err().contains("--instrument must be 'mean-independent' or 'independent', was 'strong'"), instrument.err());
    }
}
