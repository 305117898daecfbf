package dev.bracket.web;

import com.fasterxml.jackson.databind.JsonNode;
import dev.bracket.alerts.delivery.AlertDispatcher;
import dev.bracket.alerts.AlertEvaluator;
import dev.bracket.alerts.AlertsConfig;
import dev.bracket.alerts.delivery.AlertService;
import dev.bracket.alerts.delivery.RecentAlerts;
import dev.bracket.alerts.StudyAlertConfig;
import dev.bracket.bands.BandConfig;
import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.bounds.StudyCells;
import dev.bracket.report.store.LatestReports;
import dev.bracket.report.store.PublishedReport;
import dev.bracket.report.render.ReportJson;
import dev.bracket.report.StudyReport;
import io.micrometer.prometheusmetrics.PrometheusConfig;
import io.micrometer.prometheusmetrics.PrometheusMeterRegistry;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneOffset;
import java.util.List;
import java.util.Map;

import static org.assertj.core.api.Assertions.assertThat;

@DisplayName("GET /api/alerts")
class AlertsEndpointTest {

    private static final Instant T0 = Instant.parse("2026-05-04T10:00:00Z");

    @Test
    @DisplayName("503 until the alert evaluator runs, then the firing alerts and newest transitions with cautions")
    void servesAlerts() throws Exception {
        PrometheusMeterRegistry registry = new PrometheusMeterRegistry(PrometheusConfig.DEFAULT);
        HttpClient client = HttpClient.newHttpClient();
        try (WebServer server = new WebServer(new LatestReports(), registry, 10).start("127.0.0.1", 0)) {
            HttpRequest get = HttpRequest.newBuilder(URI.create("http://127.0.0.1:" + server.port() + "/api/alerts")).build();
            HttpResponse<String> before = client.send(get, HttpResponse.BodyHandlers.ofString());
            assertThat(before.statusCode()).isEqualTo(503);
            assertThat(ReportJson.mapper().readTree(before.body()).path("error").asText()).contains("no alert evaluator");

            RecentAlerts recent = new RecentAlerts(10);
            AlertService alerts = new AlertService(
                    new AlertEvaluator(Map.of("rollout", StudyAlertConfig.defaults()), Clock.fixed(T0, ZoneOffset.UTC)),
                    new AlertDispatcher(List.of(recent), Map.of(), registry), recent,
                    new AlertsConfig("bracket-alerts", Duration.ofHours(1), 10, Duration.ofSeconds(5)));
            server.showAlerts(alerts::apiView);
            // mu1 = 0.6, mu0 = 0.4, 5,000 units per arm on [0, 1]: mts-negative gives [0.2, 0.6]
            // (Manski & Pepper 2000) and its anytime band lies above 0; worst case contains 0 (Manski 1990).
            StudyCells cells = StudyCells.single(new ObservedArms(ArmStatistics.ofSummary(5000, 0.6, 0.3),
                    ArmStatistics.ofSummary(5000, 0.4, 0.3)));
            alerts.onReport(new PublishedReport("rollout", "cumulative", T0, StudyReport.of(cells, new OutcomeRange(0, 1),
                    List.of(AssumptionSet.parse("worst-case"), AssumptionSet.parse("mts-negative")), BandConfig.both(0.95))));

            HttpResponse<String> after = client.send(get, HttpResponse.BodyHandlers.ofString());
            assertThat(after.statusCode()).isEqualTo(200);
            assertThat(after.headers().firstValue("Content-Type")).hasValueSatisfying(v -> assertThat(v).startsWith("application/json"));
            JsonNode body = ReportJson.mapper().readTree(after.body());
            assertThat(body.path("schema").asText()).isEqualTo("bracket.alerts/2");
            assertThat(body.path("firing")).extracting(f -> f.path("key").asText())
                    .containsExactly("rollout/mts-negative/cumulative/sign-identified");
            assertThat(body.path("recent").get(0).path("schema").asText()).isEqualTo("bracket.alert/2");
            assertThat(body.path("recent").get(0).path("variant").asText()).isEqualTo("positive");
            assertThat(body.path("cautions").toString()).contains("only as credible as its assumptions");
            alerts.close();
        }
    }
}
