package dev.bracket.web;

import com.fasterxml.jackson.databind.JsonNode;
import dev.bracket.bands.BandMethod;
import dev.bracket.bands.BandConfig;
import dev.bracket.bands.ConfidenceBand;
import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.bounds.StudyCells;
import dev.bracket.report.LostToFollowUp;
import dev.bracket.report.store.LatestReports;
import dev.bracket.report.store.PublishedReport;
import dev.bracket.report.render.ReportJson;
import dev.bracket.report.StudyReport;
import io.micrometer.prometheusmetrics.PrometheusConfig;
import io.micrometer.prometheusmetrics.PrometheusMeterRegistry;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.io.IOException;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.time.Duration;
import java.time.Instant;
import java.util.List;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

/** The HTTP API, metrics and page, served on a free port and read with the JDK's HTTP client. */
class WebServerTest {

    private static final LatestReports LATEST = new LatestReports();
    private static final PrometheusMeterRegistry REGISTRY = new PrometheusMeterRegistry(PrometheusConfig.DEFAULT);
    private static final HttpClient CLIENT = HttpClient.newHttpClient();
    private static final Instant T0 = Instant.parse("2026-05-04T10:00:00Z");
    private static final List<AssumptionSet> SETS = List.of(
            AssumptionSet.parse("worst-case"), AssumptionSet.parse("mtr-positive,mts-positive"));
    private static WebServer server;

    /** Treated n=400 mean 0.62, control n=600 mean 0.48, outcomes in [0, 1]. */
    private static StudyReport report(long treatedN) {
        StudyCells cells = StudyCells.single(new ObservedArms(
                ArmStatistics.ofSummary(treatedN, 0.62, 0.2), ArmStatistics.ofSummary(600, 0.48, 0.2)));
        return StudyReport.of(cells, new OutcomeRange(0, 1), SETS, BandConfig.both(0.95));
    }

    @BeforeAll
    static void start() {
        LATEST.put(new PublishedReport("rollout-a", "cumulative", T0, report(400)));
        server = new WebServer(LATEST, REGISTRY, 100).start("127.0.0.1", 0);
    }

    @AfterAll
    static void stop() {
        server.close();
    }

    private static HttpResponse<String> get(String path) throws IOException, InterruptedException {
        return CLIENT.send(HttpRequest.newBuilder(URI.create("http://127.0.0.1:" + server.port() + path)).build(),
                HttpResponse.BodyHandlers.ofString());
    }

    private static JsonNode json(HttpResponse<String> r) throws IOException {
        assertThat(r.headers().firstValue("Content-Type")).hasValueSatisfying(v -> assertThat(v).startsWith("application/json"));
        return ReportJson.mapper().readTree(r.body());
    }

    @Test
    @DisplayName("GET /api/studies lists each study with its windows, counts and update time")
    void listsStudies() throws Exception {
        HttpResponse<String> r = get("/api/studies");
        assertThat(r.statusCode()).isEqualTo(200);
        JsonNode doc = json(r);
        assertThat(doc.get("schema").asText()).isEqualTo("bracket.studies/2");
        JsonNode study = doc.get("studies").get(0);
        assertThat(study.get("study").asText()).isEqualTo("rollout-a");
        assertThat(Instant.parse(study.get("updatedAt").asText())).isEqualTo(T0);
        JsonNode window = study.get("windows").get(0);
        assertThat(window.get("window").asText()).isEqualTo("cumulative");
        assertThat(window.get("counts").get("treated").asLong()).isEqualTo(400);
        assertThat(window.get("counts").get("control").asLong()).isEqualTo(600);
        assertThat(window.get("counts").get("total").asLong()).isEqualTo(1000);
    }

    @Test
    @DisplayName("GET /api/studies/{id} embeds the same document as calc --json, with the worst-case bounds of Manski (1990)")
    void studyDetailUsesTheCalcSchema() throws Exception {
        HttpResponse<String> r = get("/api/studies/rollout-a");
        assertThat(r.statusCode()).isEqualTo(200);
        JsonNode doc = json(r);
        assertThat(doc.get("schema").asText()).isEqualTo("bracket.study/2");
        JsonNode window = doc.get("windows").get(0);
        JsonNode report = window.get("report");
        String calcJson = ReportJson.mapper().writeValueAsString(
                ReportJson.toJson(LATEST.get("rollout-a", "cumulative").orElseThrow().report()));
        assertThat(report).isEqualTo(ReportJson.mapper().readTree(calcJson));
        assertThat(report.get("schema").asText()).isEqualTo(ReportJson.SCHEMA);

        // Manski (1990) worst case with p = 0.4, mu1 = 0.62, mu0 = 0.48, Y in [0, 1]:
        // lower = p*mu1 + (1-p)*0 - (1-p)*mu0 - p*1 = -0.44, upper = p*mu1 + (1-p)*1 - (1-p)*mu0 = 0.56.
        JsonNode worst = report.get("bounds").get(0);
        assertThat(worst.get("assumptions").get(0).asText()).isEqualTo("worst-case");
        assertThat(worst.get("lower").asDouble()).isCloseTo(-0.44, within(1e-12));
        assertThat(worst.get("upper").asDouble()).isCloseTo(0.56, within(1e-12));
        assertThat(worst.get("sign").asText()).isEqualTo("undetermined");
        // MTR+ with MTS+ gives [0, mu1 - mu0] (Manski & Pepper 2000): [0, 0.14].
        JsonNode joint = report.get("bounds").get(1);
        assertThat(joint.get("lower").asDouble()).isCloseTo(0.0, within(1e-12));
        assertThat(joint.get("upper").asDouble()).isCloseTo(0.14, within(1e-12));
        assertThat(window.get("counts").get("total").asLong()).isEqualTo(1000);
    }

    @Test
    @DisplayName("an unknown study is a 404 with a JSON error naming the known studies")
    void unknownStudyIs404() throws Exception {
        for (String path : List.of("/api/studies/nope", "/api/studies/nope/history")) {
            HttpResponse<String> r = get(path);
            assertThat(r.statusCode()).isEqualTo(404);
            assertThat(json(r).get("error").asText()).contains("'nope'").contains("rollout-a");
        }
    }

    @Test
    @DisplayName("GET /metrics serves the interval gauges and whatever else the monitor recorded in the registry")
    void metricsExposeIntervalGauges() throws Exception {
        REGISTRY.counter("bracket.events.accepted", "topic", "outcomes").increment(7);
        HttpResponse<String> r = get("/metrics");
        assertThat(r.statusCode()).isEqualTo(200);
        assertThat(r.headers().firstValue("Content-Type")).hasValueSatisfying(v -> assertThat(v).startsWith("text/plain"));
        String text = r.body();
        assertThat(text)
                .contains("bracket_ate_lower{assumptions=\"worst-case\",study=\"rollout-a\",window=\"cumulative\"} -0.44")
                .contains("bracket_ate_upper{assumptions=\"worst-case\",study=\"rollout-a\",window=\"cumulative\"} 0.56")
                .contains("bracket_ate_upper{assumptions=\"mtr-positive,mts-positive\",study=\"rollout-a\",window=\"cumulative\"} 0.14")
                .contains("bracket_ate_sign{assumptions=\"worst-case\",study=\"rollout-a\",window=\"cumulative\"} 0.0")
                .contains("bracket_assumptions_refuted{assumptions=\"worst-case\",study=\"rollout-a\",window=\"cumulative\"} 0.0")
                .contains("bracket_arm_units{arm=\"treated\",study=\"rollout-a\",window=\"cumulative\"} 400.0")
                // No exposures reported: nothing pending.
                .contains("bracket_arm_pending_ratio{arm=\"treated\",study=\"rollout-a\",window=\"cumulative\"} 0.0")
                .contains("bracket_report_timestamp_seconds{study=\"rollout-a\",window=\"cumulative\"} " + (double) T0.getEpochSecond())
                .contains("bracket_events_accepted_total{topic=\"outcomes\"} 7.0");
        for (ConfidenceBand band : LATEST.get("rollout-a", "cumulative").orElseThrow().report().rows().get(0).bands()) {
            String labels = "{assumptions=\"worst-case\",level=\"0.95\",method=\"" + band.method().id()
                    + "\",study=\"rollout-a\",window=\"cumulative\"}";
            assertThat(text).contains("bracket_ate_band_lower" + labels + " " + band.lower())
                    .contains("bracket_ate_band_upper" + labels + " " + band.upper());
        }
    }

    @Test
    @DisplayName("with exposures: per-arm pending, lost-to-follow-up and excess-outcome gauges and the API's lostToFollowUp")
    void pendingLostAndExcessPerArm() throws Exception {
        // Treated: 30 outcomes of 40 exposed units, so 10 pending (10/40 = 0.25), 4 of them lost (4/40 = 0.1).
        // Control: 22 outcomes but 20 exposures: 2 outcomes beyond them, so 22 units, none pending or lost.
        StudyCells cells = StudyCells.single(new ObservedArms(ArmStatistics.ofSummary(30, 0.5, 0.2).withExposures(40),
                ArmStatistics.ofSummary(22, 0.4, 0.2).withExposures(20)));
        LATEST.put(new PublishedReport("rollout-pending", "cumulative", null, null, T0,
                StudyReport.of(cells, new OutcomeRange(0, 1), SETS, BandConfig.none()), new LostToFollowUp(4, 0, Duration.ofDays(30))));
        server.refresh();

        String labels = ",study=\"rollout-pending\",window=\"cumulative\"} ";
        assertThat(get("/metrics").body())
                .contains("bracket_arm_pending_ratio{arm=\"treated\"" + labels + "0.25")
                .contains("bracket_arm_pending_ratio{arm=\"control\"" + labels + "0.0")
                .contains("bracket_arm_lost_to_follow_up_ratio{arm=\"treated\"" + labels + "0.1")
                .contains("bracket_arm_lost_to_follow_up_ratio{arm=\"control\"" + labels + "0.0")
                .contains("bracket_arm_excess_outcomes{arm=\"treated\"" + labels + "0.0")
                .contains("bracket_arm_excess_outcomes{arm=\"control\"" + labels + "2.0")
                // a study without a follow-up horizon has no lost-to-follow-up series
                .doesNotContain("bracket_arm_lost_to_follow_up_ratio{arm=\"treated\",study=\"rollout-a\"");

        JsonNode window = json(get("/api/studies/rollout-pending")).get("windows").get(0);
        JsonNode lost = window.get("lostToFollowUp");
        assertThat(lost.get("horizon").asText()).isEqualTo("PT720H");
        assertThat(lost.get("treated").asLong()).isEqualTo(4);
        assertThat(lost.get("treatedShare").asDouble()).isEqualTo(0.1);
        assertThat(lost.get("controlShare").asDouble()).isEqualTo(0.0);
        JsonNode arms = window.get("report").get("arms");
        assertThat(arms.get("treated").get("pendingShare").asDouble()).isEqualTo(0.25);
        assertThat(arms.get("control").get("excessOutcomes").asLong()).isEqualTo(2);
        assertThat(json(get("/api/studies/rollout-a")).get("windows").get(0).get("lostToFollowUp").isNull()).isTrue();
    }

    @Test
    @DisplayName("the history gains one point per new report and serves it as chart columns")
    void historyFollowsNewReports() throws Exception {
        LATEST.put(new PublishedReport("rollout-b", "cumulative", T0, report(400)));
        server.refresh();
        LATEST.put(new PublishedReport("rollout-b", "cumulative", T0.plusSeconds(1), report(600)));
        server.refresh();
        server.refresh();   // no new report: no new point

        JsonNode doc = json(get("/api/studies/rollout-b/history"));
        assertThat(doc.get("schema").asText()).isEqualTo("bracket.history/2");
        JsonNode worst = doc.get("series").get(0);
        assertThat(worst.get("assumptions").get(0).asText()).isEqualTo("worst-case");
        assertThat(worst.get("time")).extracting(JsonNode::asDouble)
                .containsExactly((double) T0.getEpochSecond(), (double) T0.getEpochSecond() + 1);
        // second report: p = 0.5, so lower = 0.5*0.62 - 0.5*0.48 - 0.5 = -0.43 (Manski 1990)
        assertThat(worst.get("lower").get(1).asDouble()).isCloseTo(-0.43, within(1e-12));
        assertThat(worst.get("status").get(1).asText()).isEqualTo("bounded");
        JsonNode bands = worst.get("bands");
        assertThat(bands).extracting(b -> b.get("method").asText()).containsExactlyInAnyOrder("fixed", "anytime");
        ConfidenceBand anytime = LATEST.get("rollout-b", "cumulative").orElseThrow().report().rows().get(0).bands().stream()
                .filter(b -> b.method() == BandMethod.ANYTIME).findFirst().orElseThrow();
        JsonNode anytimeColumns = bands.get(0).get("method").asText().equals("anytime") ? bands.get(0) : bands.get(1);
        assertThat(anytimeColumns.get("lower").get(1).asDouble()).isEqualTo(anytime.lower());
        assertThat(anytimeColumns.get("upper")).hasSize(2);
    }

    @Test
    @DisplayName("the page carries the cautions and loads uPlot from the webjar on the classpath")
    void pageAndChartLibraryAreServed() throws Exception {
        HttpResponse<String> page = get("/");
        assertThat(page.statusCode()).isEqualTo(200);
        assertThat(page.body())
                .contains("An interval is only as credible as its assumptions")
                .contains("not clinical or operational advice")
                .contains("local regulation")
                .contains("/webjars/uplot/1.6.30/dist/uPlot.iife.min.js");
        HttpResponse<String> lib = get("/webjars/uplot/1.6.30/dist/uPlot.iife.min.js");
        assertThat(lib.statusCode()).isEqualTo(200);
        assertThat(lib.body()).contains("uPlot");
        assertThat(get("/webjars/uplot/1.6.30/dist/uPlot.min.css").statusCode()).isEqualTo(200);
        assertThat(get("/bracket.js").body()).contains("/api/studies");
    }
}
