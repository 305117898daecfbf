package dev.bracket.cli;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.Arguments;
import org.junit.jupiter.params.provider.MethodSource;

import java.io.IOException;
import java.io.PrintWriter;
import java.io.StringWriter;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.stream.Stream;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** {@code bracket calc} end to end through the real command line, with captured output. */
class CalcCommandTest {

    private static final ObjectMapper JSON = new ObjectMapper();

    /** The example printed in {@code bracket calc --help}. */
    private static final String[] EXAMPLE = {"calc", "--min", "0", "--max", "1",
            "--treated-n", "400", "--treated-mean", "0.62", "--control-n", "600", "--control-mean", "0.48",
            "--assume", "worst-case", "--assume", "mtr-positive,mts-positive"};

    record Run(int exitCode, String out, String err) {
        List<String> errLines() {
            return err.lines().filter(l -> !l.isBlank()).toList();
        }
    }

    static Run run(String... args) {
        StringWriter out = new StringWriter();
        StringWriter err = new StringWriter();
        picocli.CommandLine cl = BracketCommand.newCommandLine();
        cl.setOut(new PrintWriter(out, true));
        cl.setErr(new PrintWriter(err, true));
        int code = cl.execute(args);
        return new Run(code, out.toString(), err.toString());
    }

    private static String[] with(String[] base, String... more) {
        List<String> all = new ArrayList<>(List.of(base));
        all.addAll(List.of(more));
        return all.toArray(String[]::new);
    }

    private static String[] replacing(String flag, String value) {
        String[] args = EXAMPLE.clone();
        for (int i = 0; i < args.length - 1; i++) {
            if (args[i].equals(flag)) {
                args[i + 1] = value;
                return args;
            }
        }
        throw new IllegalArgumentException(flag);
    }

    // The example by hand: p = 400/1000 = 0.4, mu1 = 0.62, mu0 = 0.48, [a, b] = [0, 1].
    // Manski (1990) worst case: [0.4*0.62 + 0.6*0 - 0.6*0.48 - 0.4*1, 0.4*0.62 + 0.6*1 - 0.6*0.48 - 0.4*0] = [-0.44, 0.56].
    // Manski & Pepper (2000) MTR+ with MTS+: [0, mu1 - mu0] = [0, 0.14].

    @Test
    @DisplayName("the help example prints a table with both assumption sets and their intervals")
    void exampleTable() {
        Run r = run(EXAMPLE);
        assertEquals(0, r.exitCode(), r.err());
        assertEquals("", r.err());
        String worst = r.out().lines().filter(l -> l.startsWith("worst-case ")).findFirst().orElseThrow();
        assertTrue(worst.contains("bounded") && worst.contains("-0.440000") && worst.contains("0.560000")
                && worst.contains("1.000000"), worst);
        String both = r.out().lines().filter(l -> l.startsWith("mtr-positive,mts-positive ")).findFirst().orElseThrow();
        assertTrue(both.contains("0.000000") && both.contains("0.140000"), both);
        // Each set's meaning in words follows the table.
        assertTrue(r.out().lines().anyMatch(l -> l.startsWith("mtr-positive,mts-positive: monotone treatment response")), r.out());
    }

    @Test
    @DisplayName("--json gives the versioned document: schema, and bounds[] with assumptions, lower, upper, status")
    void exampleJson() throws IOException {
        Run r = run(with(EXAMPLE, "--json"));
        assertEquals(0, r.exitCode(), r.err());
        JsonNode doc = JSON.readTree(r.out());
        assertEquals("bracket.bounds/2", doc.get("schema").asText());
        JsonNode bounds = doc.get("bounds");
        assertEquals(2, bounds.size());

        JsonNode worst = bounds.get(0);
        assertEquals(List.of("worst-case"), texts(worst.get("assumptions")));
        assertEquals("bounded", worst.get("status").asText());
        assertEquals(-0.44, worst.get("lower").asDouble(), 1e-12);
        assertEquals(0.56, worst.get("upper").asDouble(), 1e-12);

        JsonNode both = bounds.get(1);
        assertEquals(List.of("mtr-positive", "mts-positive"), texts(both.get("assumptions")));
        assertEquals("bounded", both.get("status").asText());
        assertEquals(0.0, both.get("lower").asDouble(), 1e-12);
        assertEquals(0.14, both.get("upper").asDouble(), 1e-12);
    }

    @Test
    @DisplayName("the README quick start (no --assume) reports every single assumption with its closed-form interval")
    void readmeQuickStart() throws IOException {
        Run r = run("calc", "--min", "0", "--max", "1", "--treated-n", "400", "--treated-mean", "0.62",
                "--control-n", "600", "--control-mean", "0.48", "--json");
        assertEquals(0, r.exitCode(), r.err());
        Map<String, double[]> expected = new LinkedHashMap<>();
        // Manski (1990): worst case, computed above.
        expected.put("worst-case", new double[] {-0.44, 0.56});
        // Manski (1997): MTR+ is [0, worst-case upper]; MTR- is [worst-case lower, 0].
        expected.put("mtr-positive", new double[] {0, 0.56});
        expected.put("mtr-negative", new double[] {-0.44, 0});
        // Manski & Pepper (2000): MTS+ is [worst-case lower, mu1 - mu0]; MTS- is [mu1 - mu0, worst-case upper].
        expected.put("mts-positive", new double[] {-0.44, 0.14});
        expected.put("mts-negative", new double[] {0.14, 0.56});
        // Manski (1990) outcome optimization: [(1-p)(a - mu0), p(mu1 - a)] = [0.6*(-0.48), 0.4*0.62].
        expected.put("optimizing-selection", new double[] {-0.288, 0.248});
        // Sorting on gains alone, derived from its two mean inequalities (m10 <= mu1, m01 <= mu0):
        // [p mu1 + (1-p) a - mu0, mu1 - (1-p) mu0 - p a] = [0.248 - 0.48, 0.62 - 0.288]. No paper checked.
        expected.put("sorting-on-gains", new double[] {-0.232, 0.332});
        // Missing at random (Rubin 1976) concerns pending outcomes only; with none it restricts nothing: the worst case.
        expected.put("missing-at-random", new double[] {-0.44, 0.56});

        JsonNode bounds = JSON.readTree(r.out()).get("bounds");
        assertEquals(expected.size(), bounds.size());
        int i = 0;
        for (Map.Entry<String, double[]> e : expected.entrySet()) {
            JsonNode row = bounds.get(i++);
            assertEquals(List.of(e.getKey()), texts(row.get("assumptions")));
            assertEquals(e.getValue()[0], row.get("lower").asDouble(), 1e-12, e.getKey());
            assertEquals(e.getValue()[1], row.get("upper").asDouble(), 1e-12, e.getKey());
        }
    }

    @Test
    @DisplayName("a refuted set and an empty arm appear in JSON with null ends, never NaN")
    void refutedAndInsufficientInJson() throws IOException {
        Run refuted = run("calc", "--min", "0", "--max", "1", "--treated-n", "10", "--treated-mean", "0.2",
                "--control-n", "10", "--control-mean", "0.6", "--assume", "mtr-positive,mts-positive", "--json");
        assertEquals(0, refuted.exitCode(), refuted.err());
        JsonNode row = JSON.readTree(refuted.out()).get("bounds").get(0);
        assertEquals("refuted", row.get("status").asText());
        assertTrue(row.get("lower").isNull() && row.get("upper").isNull(), row.toString());

        Run empty = run("calc", "--min", "0", "--max", "1", "--treated-n", "0", "--treated-mean", "0",
                "--control-n", "10", "--control-mean", "0.6", "--json");
        assertEquals(0, empty.exitCode(), empty.err());
        assertFalse(empty.out().contains("NaN"), empty.out());
        for (JsonNode b : JSON.readTree(empty.out()).get("bounds")) {
            assertEquals("insufficient-data", b.get("status").asText());
        }
    }

    static Stream<Arguments> badFlags() {
        return Stream.of(
                Arguments.of("mean outside [A, B]", replacing("--treated-mean", "1.5"), "--treated-mean"),
                Arguments.of("negative count", replacing("--control-n", "-3"), "--control-n"),
                Arguments.of("unknown assumption", replacing("--assume", "mtr-positve"), "--assume"),
                Arguments.of("A equal to B", replacing("--max", "0"), "--max"),
                Arguments.of("A above B", replacing("--min", "2"), "--min"),
                Arguments.of("not a number", replacing("--control-mean", "abc"), "--control-mean"),
                Arguments.of("count not a whole number", replacing("--treated-n", "4.5"), "--treated-n"),
                // Bhatia & Davis (2000): SD of values in [0, 1] with mean 0.62 is at most sqrt(0.62*0.38) ~ 0.485.
                Arguments.of("impossible standard deviation", with(EXAMPLE, "--treated-sd", "0.9"), "--treated-sd"),
                Arguments.of("negative standard deviation", with(EXAMPLE, "--control-sd", "-0.1"), "--control-sd"),
                Arguments.of("missing arm", new String[] {"calc", "--min", "0", "--max", "1", "--treated-n", "3",
                        "--treated-mean", "0.5", "--control-n", "3"}, "--control-mean"),
                Arguments.of("unknown direction", with(EXAMPLE, "--better", "upward"), "--better"));
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("badFlags")
    void badInputIsOneLineNamingTheFlagWithExitCode2(String what, String[] args, String flag) {
        Run r = run(args);
        assertEquals(2, r.exitCode(), what + ": " + r.err());
        assertEquals(1, r.errLines().size(), "one line expected, got:\n" + r.err());
        assertTrue(r.err().contains(flag), "should name " + flag + ": " + r.err());
        assertEquals("", r.out());
    }

    // --cells: CSV input with strata and instrument levels.

    @Test
    @DisplayName("--json: an SD that was not given is null, not 0 (README: missing numbers are null)")
    void sdNotGivenIsNull() throws Exception {
        JsonNode none = JSON.readTree(run(with(EXAMPLE, "--json")).out()).get("arms");
        assertTrue(none.get("treated").get("sd").isNull());
        assertTrue(none.get("control").get("sd").isNull());
        JsonNode one = JSON.readTree(run(with(EXAMPLE, "--json", "--treated-sd", "0.3")).out()).get("arms");
        assertEquals(0.3, one.get("treated").get("sd").asDouble());
        assertTrue(one.get("control").get("sd").isNull());
    }

    @Test
    @DisplayName("a refuted row shows only bands that say refuted, in the table and in JSON")
    void refutedRowHasNoBands() throws Exception {
        // mu1 < mu0 contradicts mtr-positive with mts-positive (Manski & Pepper 2000: the pair gives [0, mu1 - mu0]).
        String[] args = replacing("--treated-mean", "0.40");
        JsonNode rows = JSON.readTree(run(with(args, "--json")).out()).get("bounds");
        JsonNode refuted = rows.get(1);
        assertEquals("refuted", refuted.get("status").asText());
        refuted.path("bands").forEach(b -> assertEquals("refuted", b.get("status").asText(), b.toString()));
        assertEquals(2, rows.get(0).get("bands").size());
        List<String> table = run(args).out().lines().toList();
        int at = table.indexOf(table.stream().filter(l -> l.startsWith("mtr-positive,mts-positive")).findFirst().orElseThrow());
        for (String line : table.subList(at + 1, table.size())) {
            if (!line.trim().contains("% band")) {
                break;
            }
            assertTrue(line.contains("refuted") && !line.contains("negative") && !line.contains("positive"), line);
        }
    }

    private static Path write(Path dir, String name, String text) throws IOException {
        Path file = dir.resolve(name);
        Files.writeString(file, text, StandardCharsets.UTF_8);
        return file;
    }

    @Test
    @DisplayName("--cells with strata: the study interval is the share-weighted sum of the stratum intervals")
    void cellsWithStrata(@TempDir Path dir) throws IOException {
        Path csv = write(dir, "strata.csv", """
                stratum,arm,n,mean,sd
                north,treated,30,6.0,1.5
                north,control,70,4.0,
                south,treated,120,3.0,2
                south,control,80,5.5,0.5
                """);
        Run r = run("calc", "--min", "0", "--max", "10", "--cells", csv.toString(), "--assume", "worst-case", "--json");
        assertEquals(0, r.exitCode(), r.err());
        JsonNode row = JSON.readTree(r.out()).get("bounds").get(0);
        // Manski (1990) per stratum, weights 100/300 and 200/300:
        //   north p = 0.3: [0.3*6 - 0.7*4 - 0.3*10, 0.3*6 + 0.7*10 - 0.7*4] = [-4.0, 6.0]
        //   south p = 0.6: [0.6*3 - 0.4*5.5 - 0.6*10, 0.6*3 + 0.4*10 - 0.4*5.5] = [-6.4, 3.6]
        assertEquals((1 * -4.0 + 2 * -6.4) / 3, row.get("lower").asDouble(), 1e-12);
        assertEquals((1 * 6.0 + 2 * 3.6) / 3, row.get("upper").asDouble(), 1e-12);
        JsonNode strata = row.get("strata");
        assertEquals(2, strata.size());
        assertEquals("north", strata.get(0).get("stratum").asText());
        assertEquals(-4.0, strata.get(0).get("lower").asDouble(), 1e-12);
        assertEquals(3.6, strata.get(1).get("upper").asDouble(), 1e-12);
    }

    @Test
    @DisplayName("--cells: a stratum with treated units only is reported with its worst case; the study stays bounded")
    void stratumWithOneArm(@TempDir Path dir) throws IOException {
        Path csv = write(dir, "one-arm.csv", """
                stratum,arm,n,mean
                north,treated,30,6.0
                north,control,70,4.0
                pilot,treated,20,7.5
                """);
        Run r = run("calc", "--min", "0", "--max", "10", "--cells", csv.toString(), "--assume", "worst-case", "--json");
        assertEquals(0, r.exitCode(), r.err());
        JsonNode row = JSON.readTree(r.out()).get("bounds").get(0);
        // Manski (1990): north p = 0.3 gives [-4.0, 6.0] (above); pilot p = 1 gives [7.5 - 10, 7.5 - 0];
        // weights 100/120 and 20/120.
        assertEquals("bounded", row.get("status").asText());
        assertEquals((100 * -4.0 + 20 * -2.5) / 120, row.get("lower").asDouble(), 1e-12);
        assertEquals((100 * 6.0 + 20 * 7.5) / 120, row.get("upper").asDouble(), 1e-12);
        JsonNode pilot = row.get("strata").get(1);
        assertEquals("pilot", pilot.get("stratum").asText());
        assertEquals(-2.5, pilot.get("lower").asDouble(), 1e-12);
        assertEquals(7.5, pilot.get("upper").asDouble(), 1e-12);
    }

    @Test
    @DisplayName("--cells with an instrument column reproduces the vitamin A bounds [-0.1946, 0.0054]")
    void cellsWithInstrument(@TempDir Path dir) throws IOException {
        // Sommer et al. (1986) counts as in Imbens & Rubin (1997), Table 1 (that table not seen); counts
        // and the published bounds [-0.1946, 0.0054] confirmed in the bpbounds R package vignette
        // (github.com/remlapmot/bpbounds, vignettes/bpbounds.Rmd, after Balke & Pearl 1997, Table 1).
        // Y = 1 survived.
        Path csv = write(dir, "vitamin-a.csv", "instrument,arm,n,mean\n"
                + "0,control,11588," + (11514.0 / 11588) + "\n"
                + "1,control,2419," + (2385.0 / 2419) + "\n"
                + "1,treated,9675," + (9663.0 / 9675) + "\n");
        Run r = run("calc", "--min", "0", "--max", "1", "--cells", csv.toString(), "--assume", "worst-case", "--json");
        assertEquals(0, r.exitCode(), r.err());
        JsonNode row = JSON.readTree(r.out()).get("bounds").get(0);
        assertEquals("bounded", row.get("status").asText());
        assertEquals(-0.1946, row.get("lower").asDouble(), 5e-5);
        assertEquals(0.0054, row.get("upper").asDouble(), 5e-5);
    }

    static Stream<Arguments> badCsv() {
        return Stream.of(
                Arguments.of("unknown arm", "arm,n,mean\ntreated,5,0.5\nplacebo,5,0.4\n", "line 3"),
                Arguments.of("negative n", "arm,n,mean\ntreated,5,0.5\ncontrol,-5,0.4\n", "line 3"),
                Arguments.of("mean outside range", "arm,n,mean\ntreated,5,1.5\ncontrol,5,0.4\n", "line 2"),
                Arguments.of("mean not a number", "arm,n,mean\ntreated,5,0.5\ncontrol,5,zero\n", "line 3"),
                Arguments.of("after a blank line, no final newline", "arm,n,mean\ntreated,5,0.5\n\ncontrol,x,0.4", "line 4"),
                Arguments.of("impossible sd", "arm,n,mean,sd\ntreated,5,0.5,0.1\ncontrol,5,0.5,2\n", "line 3"),
                Arguments.of("unknown column", "arm,n,mean,weight\ntreated,5,0.5,1\n", "unknown column 'weight'"),
                Arguments.of("missing column", "arm,mean\ntreated,0.5\n", "missing column 'n'"),
                Arguments.of("no rows", "arm,n,mean\n", "no data rows"));
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("badCsv")
    void csvErrorsNameFileAndLine(String what, String text, String where, @TempDir Path dir) throws IOException {
        Path csv = write(dir, "cells.csv", text);
        Run r = run("calc", "--min", "0", "--max", "1", "--cells", csv.toString());
        assertEquals(2, r.exitCode(), what + ": " + r.err());
        assertEquals(1, r.errLines().size(), "one line expected, got:\n" + r.err());
        assertTrue(r.err().contains(csv.toString()), "should name the file: " + r.err());
        assertTrue(r.err().contains(where), "should say " + where + ": " + r.err());
    }

    @Test
    @DisplayName("a missing --cells file and --cells mixed with arm flags are input errors")
    void cellsMisuse(@TempDir Path dir) throws IOException {
        Run missing = run("calc", "--min", "0", "--max", "1", "--cells", dir.resolve("nope.csv").toString());
        assertEquals(2, missing.exitCode());
        assertTrue(missing.err().contains("--cells") && missing.err().contains("nope.csv"), missing.err());

        Path csv = write(dir, "ok.csv", "arm,n,mean\ntreated,5,0.5\ncontrol,5,0.4\n");
        Run mixed = run("calc", "--min", "0", "--max", "1", "--cells", csv.toString(), "--treated-n", "4");
        assertEquals(2, mixed.exitCode());
        assertTrue(mixed.err().contains("--cells"), mixed.err());
    }

    private static List<String> texts(JsonNode array) {
        List<String> out = new ArrayList<>();
        array.forEach(n -> out.add(n.asText()));
        return out;
    }
}
