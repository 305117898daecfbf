package dev.bracket.cli;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import org.apache.commons.math3.stat.descriptive.SummaryStatistics;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;

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

    private Path hourlyConfig() throws Exception {
        Path c = dir.resolve("hourly.yaml");
        Files.writeString(c, """
                studies:
                  - id: checkout
                    outcome: {min: 0, max: 1}
                    assume: [[worst-case]]
                inputs:
                  - topic: outcomes
                windows:
                  - {name: hourly, kind: tumbling, size: 1h}
                  - {name: two-hours, kind: sliding, size: 2h, step: 1h}
                grace: 0s
                bands: none
                """);
        return c;
    }

    /** {@code n} events in the hour starting {@code hour} hours after midnight, the first {@code treated} treated, outcome 1 when treated. */
    private static String hour(int hour, int n, int treated) {
        StringBuilder out = new StringBuilder();
        for (int i = 0; i < n; i++) {
            out.append(String.format(java.util.Locale.ROOT, "{\"study\":\"checkout\",\"unit\":\"u%d-%d\",\"treated\":%s,\"outcome\":%d,"
                    + "\"time\":\"2026-03-02T%02d:%02d:00Z\"}%n", hour, i, i < treated, i < treated ? 1 : 0, hour, i % 60));
        }
        return out.toString();
    }

    @Test
    @DisplayName("--json reports every hour of the replayed day and every position of a sliding window, each with its own events")
    void reportsEveryPane() throws Exception {
        Path day = dir.resolve("day.jsonl");
        // Hours 00, 01 and 03 hold events (02 is empty); treated / control per hour: 3/2, 1/4, 5/5.
        Files.writeString(day, hour(0, 5, 3) + hour(1, 5, 1) + hour(3, 10, 5));
        CalcCommandTest.Run run = CalcCommandTest.run("replay", "--config", hourlyConfig().toString(), "--json", day.toString());
        assertThat(run.exitCode()).isZero();
        JsonNode doc = JSON.readTree(run.out());
        assertThat(doc.get("schema").asText()).isEqualTo("bracket.replay/3");
        List<String> seen = new ArrayList<>();
        for (JsonNode r : doc.get("reports")) {
            seen.add(r.get("window").asText() + " " + r.get("windowStart").asText("-") + " " + r.get("arms").get("treated").get("n").asLong()
                    + "/" + r.get("arms").get("control").get("n").asLong());
        }
        // Tumbling: one report per hour with events. Sliding (2 h, step 1 h): every 2-hour span
        // holding an hour with events, i.e. ending at 01, 02, 03, 04 and 05.
        assertThat(seen).containsExactly(
                "cumulative - 9/11",
                "hourly 2026-03-02T00:00:00Z 3/2",
                "hourly 2026-03-02T01:00:00Z 1/4",
                "hourly 2026-03-02T03:00:00Z 5/5",
                "two-hours 2026-03-01T23:00:00Z 3/2",
                "two-hours 2026-03-02T00:00:00Z 4/6",
                "two-hours 2026-03-02T01:00:00Z 1/4",
                "two-hours 2026-03-02T02:00:00Z 5/5",
                "two-hours 2026-03-02T03:00:00Z 5/5");
    }

    @Test
    @DisplayName("files declared as one partition are read in order: an earlier hour after a later one is late (grace 0)")
    void partitionOfFilesKeepsOrder() throws Exception {
        Path later = dir.resolve("later.jsonl");
        Path earlier = dir.resolve("earlier.jsonl");
        Files.writeString(later, hour(3, 4, 2));
        Files.writeString(earlier, hour(0, 6, 3));
        String config = hourlyConfig().toString();
        // As two partitions each keeps its own event time: hour 00 is an hourly pane of its own.
        JsonNode apart = JSON.readTree(CalcCommandTest.run("replay", "--config", config, "--json", later.toString(), earlier.toString()).out());
        // As one partition read later-then-earlier, hour 00 closed before its events arrived:
        // they count in cumulative only, and as late events of the windowed ones.
        CalcCommandTest.Run joined = CalcCommandTest.run("replay", "--config", config, "--json",
                "--partition", later + "," + earlier);
        assertThat(joined.exitCode()).as(joined.err()).isZero();
        JsonNode together = JSON.readTree(joined.out());
        assertThat(hourly(apart)).containsExactly("2026-03-02T00:00:00Z 6 late 0", "2026-03-02T03:00:00Z 4 late 0");
        assertThat(hourly(together)).containsExactly("2026-03-02T03:00:00Z 4 late 6");
        assertThat(together.get("reports").get(0).get("arms").get("treated").get("n").asLong()
                + together.get("reports").get(0).get("arms").get("control").get("n").asLong()).as("cumulative").isEqualTo(10);

        CalcCommandTest.Run empty = CalcCommandTest.run("replay", "--config", config, "--partition", later + ",," + earlier);
        assertThat(empty.exitCode()).isEqualTo(2);
        assertThat(empty.errLines()).hasSize(1).first().asString().contains("an empty file name");
    }

    private static List<String> hourly(JsonNode doc) {
        List<String> out = new ArrayList<>();
        for (JsonNode r : doc.get("reports")) {
            if (r.get("window").asText().equals("hourly")) {
                out.add(r.get("windowStart").asText() + " " + (r.get("arms").get("treated").get("n").asLong()
                        + r.get("arms").get("control").get("n").asLong()) + " late " + r.get("lateEvents").asLong());
            }
        }
        return out;
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
