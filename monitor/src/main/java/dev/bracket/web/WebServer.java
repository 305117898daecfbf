package dev.bracket.web;

import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.databind.JsonNode;
import dev.bracket.report.store.LatestReports;
import dev.bracket.report.store.PublishedReport;
import dev.bracket.report.render.ReportJson;
import io.javalin.Javalin;
import io.javalin.http.Context;
import io.javalin.http.HttpStatus;
import io.javalin.http.staticfiles.Location;
import io.micrometer.core.instrument.binder.jvm.JvmGcMetrics;
import io.micrometer.prometheusmetrics.PrometheusMeterRegistry;

import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.concurrent.Executors;
import java.util.concurrent.ScheduledExecutorService;
import java.util.concurrent.TimeUnit;
import java.util.function.Supplier;

/**
 * The monitor's HTTP face: the JSON API, Prometheus metrics and the web page with the
 * intervals over time. Reads the reports the bound updater publishes into {@link LatestReports};
 * a sampler copies each new report into the bounded {@link ReportHistory} and registers its
 * gauges, once a second or when {@link #refresh()} is called.
 *
 * <pre>
 *   GET /                         the page (intervals over time, cautions)
 *   GET /api/studies              {@link StudyDocuments#list}
 *   GET /api/studies/{id}         {@link StudyDocuments#study}; 404 with {"error": ...} for an unknown study
 *   GET /api/studies/{id}/history {@link StudyDocuments#history}
 *   GET /api/studies/{id}/history.csv the same history as CSV ({@link HistoryCsv})
 *   GET /api/alerts               alerts firing now and the newest transitions ({@code AlertJson#listing});
 *                                 503 with {"error": ...} until {@link #showAlerts} is called
 *   GET /metrics                  Prometheus text: the registry passed in, with {@link StudyGauges}
 *   GET /health/live              200 when the monitor's threads run, else 503; body {"status", "failing", "checks"}
 *   GET /health/ready             200 when it is also connected, assigned and committing, else 503 (same body);
 *                                 before {@link #showHealth} is called: live 200, ready 503 ("starting")
 * </pre>
 */
public final class WebServer implements AutoCloseable {

    /** Points kept per series: an hour at one report a second. */
    public static final int DEFAULT_HISTORY = 3600;

    private static final String JSON = "application/json";
    private static final String PROMETHEUS_TEXT = "text/plain; version=0.0.4; charset=utf-8";

    private final LatestReports latest;
    private final PrometheusMeterRegistry registry;
    private final ReportHistory history;
    private final StudyGauges gauges;
    private final Javalin app;
    private final JvmGcMetrics gcMetrics;
    private ScheduledExecutorService sampler;
    private String host;
    private volatile Supplier<? extends JsonNode> alerts;
    private volatile Supplier<Map<String, Object>> live = () -> starting("ok");
    private volatile Supplier<Map<String, Object>> ready = () -> starting("failing");

    /**
     * @param latest   where the bound updater publishes reports
     * @param registry the registry the rest of the monitor records its counters in; the
     *                 interval gauges are added to it and {@code /metrics} serves all of it
     */
    public WebServer(LatestReports latest, PrometheusMeterRegistry registry, int historyCapacity) {
        this.latest = latest;
        this.registry = registry;
        this.history = new ReportHistory(historyCapacity);
        this.gauges = new StudyGauges(registry, latest);
        this.gcMetrics = ProcessMetrics.bindTo(registry);
        this.app = Javalin.create(config -> {
            config.showJavalinBanner = false;
            config.staticFiles.add("/dev/bracket/web/page", Location.CLASSPATH);
            config.staticFiles.enableWebjars();
        });
        app.get("/api/studies", ctx -> json(ctx, StudyDocuments.list(latest)));
        app.get("/api/studies/{id}", ctx -> found(ctx, StudyDocuments.study(latest, ctx.pathParam("id"))));
        app.get("/api/studies/{id}/history", ctx -> {
            refresh();
            found(ctx, StudyDocuments.history(history, ctx.pathParam("id")));
        });
        app.get("/api/studies/{id}/history.csv", ctx -> {
            refresh();
            Optional<String> csv = HistoryCsv.of(history, ctx.pathParam("id"));
            if (csv.isPresent()) {
                ctx.contentType("text/csv; charset=utf-8")
                        .header("Content-Disposition", "attachment; filename=\"" + ctx.pathParam("id").replaceAll("[^A-Za-z0-9._-]", "_")
                                + "-history.csv\"")
                        .result(csv.get());
            } else {
                found(ctx, Optional.empty());
            }
        });
        app.get("/api/alerts", ctx -> {
            Supplier<? extends JsonNode> view = alerts;
            if (view == null) {
                ctx.status(HttpStatus.SERVICE_UNAVAILABLE);
                json(ctx, StudyDocuments.error("no alert evaluator is running yet; try again once the monitor has started"));
            } else {
                json(ctx, view.get());
            }
        });
        app.get("/health/live", ctx -> health(ctx, live.get()));
        app.get("/health/ready", ctx -> health(ctx, ready.get()));
        app.get("/metrics", ctx -> {
            refresh();
            ctx.contentType(PROMETHEUS_TEXT).result(registry.scrape());
        });
    }

    /** Binds to {@code host:port} (port 0 picks a free one) and starts sampling reports every second. */
    public WebServer start(String host, int port) {
        this.host = host;
        app.start(host, port);
        sampler = Executors.newSingleThreadScheduledExecutor(r -> {
            Thread t = new Thread(r, "bracket-web-sampler");
            t.setDaemon(true);
            return t;
        });
        sampler.scheduleAtFixedRate(this::refresh, 0, 1, TimeUnit.SECONDS);
        return this;
    }

    /**
     * Copies every report not seen yet into the history and registers its gauges. Also run
     * before serving history and metrics, so a report published a moment ago is included.
     */
    public synchronized void refresh() {
        for (String study : latest.studies()) {
            for (PublishedReport r : latest.study(study)) {
                gauges.register(r);
                history.record(r);
            }
        }
    }

    /**
     * Serves {@code GET /api/alerts} from {@code view} (the monitor's {@code AlertService::apiView});
     * the monitor starts after the server, so this is set once it runs.
     */
    public void showAlerts(Supplier<? extends JsonNode> view) {
        this.alerts = view;
    }

    /**
     * Serves the health endpoints from the monitor's documents, whose {@code status} is
     * {@code "ok"} (HTTP 200) or {@code "failing"} (HTTP 503).
     */
    public void showHealth(Supplier<Map<String, Object>> liveness, Supplier<Map<String, Object>> readiness) {
        this.live = liveness;
        this.ready = readiness;
    }

    private static Map<String, Object> starting(String status) {
        return Map.of("status", status, "failing", status.equals("ok") ? List.of() : List.of("monitor"),
                "checks", Map.of("monitor", Map.of("ok", status.equals("ok"), "detail", "the monitor is starting")));
    }

    private static void health(Context ctx, Map<String, Object> doc) throws JsonProcessingException {
        ctx.status("ok".equals(doc.get("status")) ? HttpStatus.OK : HttpStatus.SERVICE_UNAVAILABLE);
        ctx.contentType(JSON).result(ReportJson.mapper().writeValueAsString(doc));
    }

    /** The bound port, after {@link #start}. */
    public int port() {
        return app.port();
    }

    /** Where people open the page, e.g. {@code http://127.0.0.1:8080/}. */
    public String address() {
        String shown = host.equals("0.0.0.0") || host.equals("::") ? "localhost" : host;
        return "http://" + shown + ":" + port() + "/";
    }

    public PrometheusMeterRegistry registry() {
        return registry;
    }

    @Override
    public void close() {
        if (sampler != null) {
            sampler.shutdownNow();
        }
        app.stop();
        gcMetrics.close();
    }

    private void found(Context ctx, Optional<? extends JsonNode> document) throws JsonProcessingException {
        if (document.isPresent()) {
            json(ctx, document.get());
        } else {
            String id = ctx.pathParam("id");
            ctx.status(HttpStatus.NOT_FOUND);
            json(ctx, StudyDocuments.error("no study '" + id + "' has a report yet; known studies: "
                    + (latest.studies().isEmpty() ? "none" : String.join(", ", latest.studies()))));
        }
    }

    private static void json(Context ctx, JsonNode node) throws JsonProcessingException {
        ctx.contentType(JSON).result(ReportJson.mapper().writeValueAsString(node));
    }
}
