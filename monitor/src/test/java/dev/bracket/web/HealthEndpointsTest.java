package dev.bracket.web;

import com.fasterxml.jackson.databind.JsonNode;
import dev.bracket.report.store.LatestReports;
import dev.bracket.report.render.ReportJson;
import io.micrometer.prometheusmetrics.PrometheusConfig;
import io.micrometer.prometheusmetrics.PrometheusMeterRegistry;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.util.List;
import java.util.Map;

import static org.assertj.core.api.Assertions.assertThat;

/** {@code GET /health/live} and {@code /health/ready}: the status code follows the document's status. */
class HealthEndpointsTest {

    private static final HttpClient CLIENT = HttpClient.newHttpClient();

    private static HttpResponse<String> get(WebServer server, String path) throws Exception {
        return CLIENT.send(HttpRequest.newBuilder(URI.create("http://127.0.0.1:" + server.port() + path)).build(),
                HttpResponse.BodyHandlers.ofString());
    }

    @Test
    @DisplayName("before the monitor runs: live 200, ready 503 'starting'; then each endpoint answers 200 for ok and 503 for failing")
    void statusFollowsTheDocument() throws Exception {
        try (WebServer server = new WebServer(new LatestReports(), new PrometheusMeterRegistry(PrometheusConfig.DEFAULT), 10)
                .start("127.0.0.1", 0)) {
            assertThat(get(server, "/health/live").statusCode()).isEqualTo(200);
            HttpResponse<String> starting = get(server, "/health/ready");
            assertThat(starting.statusCode()).isEqualTo(503);
            assertThat(starting.body()).contains("the monitor is starting");

            Map<String, Object> failing = Map.of("status", "failing", "failing", List.of("broker"),
                    "checks", Map.of("broker", Map.of("ok", false, "detail", "Kafka does not answer within 2 s")));
            server.showHealth(() -> Map.of("status", "ok", "failing", List.of()), () -> failing);
            assertThat(get(server, "/health/live").statusCode()).isEqualTo(200);
            HttpResponse<String> ready = get(server, "/health/ready");
            assertThat(ready.statusCode()).isEqualTo(503);
            assertThat(ready.headers().firstValue("Content-Type")).hasValueSatisfying(v -> assertThat(v).startsWith("application/json"));
            JsonNode doc = ReportJson.mapper().readTree(ready.body());
            assertThat(doc.get("failing").get(0).asText()).isEqualTo("broker");
            assertThat(doc.get("checks").get("broker").get("detail").asText()).contains("does not answer");
        }
    }
}
