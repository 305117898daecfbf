package dev.bracket.cli;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import org.apache.commons.math3.distribution.NormalDistribution;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

import java.io.IOException;
import java.util.ArrayList;
import java.util.List;

import static dev.bracket.cli.CalcCommandTest.run;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** {@code bracket calc --band-level/--bands}: confidence bands in the JSON rows and the table. */
class CalcBandsTest {

    private static final ObjectMapper JSON = new ObjectMapper();

    private static final List<String> ARMS = List.of("calc", "--min", "0", "--max", "1",
            "--treated-n", "400", "--treated-mean", "0.62", "--control-n", "600", "--control-mean", "0.48");

    private static String[] args(String... more) {
        List<String> all = new ArrayList<>(ARMS);
        all.addAll(List.of(more));
        return all.toArray(String[]::new);
    }

    private static JsonNode bands(String... more) throws IOException {
        CalcCommandTest.Run r = run(args(more));
        assertEquals(0, r.exitCode(), r.err());
        return JSON.readTree(r.out()).get("bounds").get(0).get("bands");
    }

    @Test
    @DisplayName("with SDs, the fixed-horizon band matches the delta method worked by hand")
    void fixedBandByHand() throws IOException {
        JsonNode bands = bands("--treated-sd", "0.48", "--control-sd", "0.5", "--assume", "worst-case", "--json");
        assertEquals(2, bands.size());
        JsonNode fixed = bands.get(0);
        assertEquals("fixed", fixed.get("method").asText());
        assertEquals(0.95, fixed.get("level").asDouble(), 0);
        assertTrue(fixed.get("basis").asText().contains("sample standard deviations"), fixed.toString());
        // Worst case (Manski 1990): lower = p(mu1 - b) + q(a - mu0), upper = p(mu1 - a) + q(b - mu0) = [-0.44, 0.56].
        // Both ends have gradient (mu1 + mu0 - a - b, p, -q) in (p, mu1, mu0), so by the delta method
        // se^2 = (mu1 + mu0 - 1)^2 p q / n + p^2 s1^2 / n1 + q^2 s0^2 / n0.
        double p = 0.4;
        double q = 0.6;
        double se = Math.sqrt(Math.pow(0.62 + 0.48 - 1, 2) * p * q / 1000 + p * p * 0.48 * 0.48 / 400 + q * q * 0.5 * 0.5 / 600);
        // Width 1 is about 45 standard errors: Imbens & Manski's C is the one-sided z(0.95) (Commons Math).
        double c = new NormalDistribution(0, 1).inverseCumulativeProbability(0.95);
        assertEquals(-0.44 - c * se, fixed.get("lower").asDouble(), 1e-9);
        assertEquals(0.56 + c * se, fixed.get("upper").asDouble(), 1e-9);
        JsonNode anytime = bands.get(1);
        assertEquals("anytime", anytime.get("method").asText());
        assertTrue(anytime.get("lower").asDouble() < fixed.get("lower").asDouble()
                && anytime.get("upper").asDouble() > fixed.get("upper").asDouble(), "anytime is the wider band: " + bands);
    }

    @Test
    @DisplayName("without SDs both bands use the largest spread the range allows and say so")
    void withoutSdsTheRangeBoundStandsIn() throws IOException {
        JsonNode without = bands("--assume", "mtr-positive,mts-positive", "--json");
        JsonNode with = bands("--treated-sd", "0.48", "--control-sd", "0.5", "--assume", "mtr-positive,mts-positive", "--json");
        assertTrue(without.get(0).get("basis").asText().contains("(b-a)^2/4"), without.toString());
        // Popoviciu's (b-a)^2/4 = 0.25 exceeds both sample variances, so the band is wider.
        assertTrue(without.get(0).get("upper").asDouble() > with.get(0).get("upper").asDouble());
        // Bhatia & Davis (2000): variance <= (b - mean)(mean - a) = 0.62 * 0.38 > 0.48^2 and 0.48 * 0.52 < 0.5^2,
        // so the anytime band without SDs uses a larger treated spread and a smaller control spread.
        assertTrue(without.get(1).get("basis").asText().contains("largest spreads the range allows"), without.toString());
        assertTrue(with.get(1).get("basis").asText().contains("observed spreads"), with.toString());
        assertTrue(without.get(1).get("upper").asDouble() != with.get(1).get("upper").asDouble(), without + " vs " + with);
    }

    @Test
    @DisplayName("--bands picks the bands and --band-level sets their level")
    void bandAndLevelFlags() throws IOException {
        JsonNode anytime = bands("--bands", "anytime", "--band-level", "0.9", "--assume", "worst-case", "--json");
        assertEquals(1, anytime.size());
        assertEquals("anytime", anytime.get(0).get("method").asText());
        assertEquals(0.9, anytime.get(0).get("level").asDouble(), 0);
        JsonNode wider = bands("--bands", "anytime", "--band-level", "0.99", "--assume", "worst-case", "--json");
        assertTrue(wider.get(0).get("width").asDouble() > anytime.get(0).get("width").asDouble());
        JsonNode fixed = bands("--bands", "fixed", "--assume", "worst-case", "--json");
        assertEquals(1, fixed.size());
        assertEquals("fixed", fixed.get(0).get("method").asText());
        CalcCommandTest.Run none = run(args("--bands", "none", "--assume", "worst-case", "--json"));
        assertEquals(0, none.exitCode(), none.err());
        JsonNode row = JSON.readTree(none.out()).get("bounds").get(0);
        assertEquals("bounded", row.path("status").asText(), row.toString());
        assertFalse(row.has("bands"), "--bands none, as bands: none in the configuration: " + row);
    }

    @Test
    @DisplayName("the table shows each band under its row and says what the bands rest on")
    void tableShowsBands() {
        CalcCommandTest.Run r = run(args("--assume", "worst-case"));
        assertEquals(0, r.exitCode(), r.err());
        List<String> lines = r.out().lines().toList();
        int row = lines.indexOf(lines.stream().filter(l -> l.startsWith("worst-case ")).findFirst().orElseThrow());
        assertTrue(lines.get(row + 1).trim().startsWith("fixed 95% band"), r.out());
        assertTrue(lines.get(row + 2).trim().startsWith("anytime 95% band"), r.out());
        assertTrue(r.out().contains("(b-a)^2/4") && r.out().contains("largest spreads the range allows"), r.out());
        assertTrue(r.out().contains("alert on the anytime band"), r.out());
    }

    @Test
    @DisplayName("refuted and empty arms give band statuses, never NaN")
    void refutedAndInsufficientBands() throws IOException {
        // mu1 < mu0 by far, with many units: MTR+ with MTS+ is refuted by both bands.
        CalcCommandTest.Run refuted = run("calc", "--min", "0", "--max", "1", "--treated-n", "5000", "--treated-mean", "0.2",
                "--control-n", "5000", "--control-mean", "0.6", "--assume", "mtr-positive,mts-positive", "--json");
        for (JsonNode band : JSON.readTree(refuted.out()).get("bounds").get(0).get("bands")) {
            assertEquals("refuted", band.get("status").asText(), band.toString());
            assertTrue(band.get("lower").isNull() && band.get("upper").isNull());
        }
        CalcCommandTest.Run empty = run("calc", "--min", "0", "--max", "1", "--treated-n", "0", "--treated-mean", "0",
                "--control-n", "10", "--control-mean", "0.5", "--json");
        assertFalse(empty.out().contains("NaN"), empty.out());
        for (JsonNode row : JSON.readTree(empty.out()).get("bounds")) {
            for (JsonNode band : row.get("bands")) {
                assertEquals("insufficient-data", band.get("status").asText());
            }
        }
    }

    @ParameterizedTest(name = "--band-level {0}")
    @ValueSource(strings = {"0", "1", "-0.5", "1.5", "NaN", "ninety"})
    @DisplayName("a level outside (0, 1) is one line naming --band-level, exit code 2")
    void badLevel(String level) {
        CalcCommandTest.Run r = run(args("--band-level", level));
        assertEquals(2, r.exitCode(), r.err());
        assertEquals(1, r.errLines().size(), r.err());
        assertTrue(r.err().contains("--band-level"), r.err());
        assertEquals("", r.out());
    }

    @Test
    void badBand() {
        CalcCommandTest.Run r = run(args("--bands", "sometimes"));
        assertEquals(2, r.exitCode());
        assertEquals(1, r.errLines().size(), r.err());
        assertTrue(r.err().contains("--bands") && r.err().contains("both, fixed, anytime or none"), r.err());
    }
}
