package dev.bracket.alerts.delivery;

import dev.bracket.alerts.WebhookTarget;
import dev.bracket.alerts.AlertEvaluator;
import dev.bracket.alerts.AlertState;
import dev.bracket.alerts.AlertsConfig;
import dev.bracket.alerts.BoundSnapshot;
import dev.bracket.alerts.StudyAlertConfig;
import com.fasterxml.jackson.databind.node.ObjectNode;
import dev.bracket.report.BoundRow;
import dev.bracket.report.PublishedReport;
import io.micrometer.core.instrument.MeterRegistry;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

import java.time.Clock;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.concurrent.Executors;
import java.util.concurrent.ScheduledExecutorService;
import java.util.concurrent.TimeUnit;

/**
 * Alerting as the monitor runs it: the evaluator, its sinks and its clock. The bound updater
 * calls {@link #onReport} after each update, the event consumer {@link #recordEvents}; a
 * scheduler judges the per-study rules every {@link AlertsConfig#checkInterval()}. At start, state is
 * restored from the alerts topic, so a restart does not fire again what already fired.
 */
public final class AlertService implements AutoCloseable {

    private static final Logger LOG = LoggerFactory.getLogger(AlertService.class);

    private final AlertEvaluator evaluator;
    private final AlertDispatcher dispatcher;
    private final RecentAlerts recent;
    private final ScheduledExecutorService clockThread;

    /** Wires given parts and starts the clock; {@link #start} builds the parts from configuration. */
    public AlertService(AlertEvaluator evaluator, AlertDispatcher dispatcher, RecentAlerts recent, AlertsConfig options) {
        this.evaluator = evaluator;
        this.dispatcher = dispatcher;
        this.recent = recent;
        this.clockThread = Executors.newSingleThreadScheduledExecutor(r -> {
            Thread t = new Thread(r, "bracket-alerts-clock");
            t.setDaemon(true);
            return t;
        });
        long tick = options.checkInterval().toMillis();
        clockThread.scheduleWithFixedDelay(this::tick, tick, tick, TimeUnit.MILLISECONDS);
    }

    /**
     * Restores state from the alerts topic (when a broker is given), then starts evaluating.
     *
     * @param studies each study's alert settings, by study id
     * @param kafka   client properties of the Kafka cluster holding the alerts topic; empty for no
     *                topic (state then lives in memory only, and a restart may fire again)
     */
    public static AlertService start(Map<String, StudyAlertConfig> studies, AlertsConfig options,
                                     Optional<Map<String, String>> kafka, MeterRegistry registry, Clock clock) {
        AlertEvaluator evaluator = new AlertEvaluator(studies, clock);
        RecentAlerts recent = new RecentAlerts(options.recentTransitions());
        List<AlertSink> common = new ArrayList<>(List.of(new LogAlertSink(), recent));
        if (kafka.isPresent()) {
            evaluator.restore(AlertHistory.read(kafka.get(), options.topic(), options.restoreTimeout()));
            common.add(KafkaAlertSink.connect(kafka.get(), options.topic(), registry));
        } else {
            LOG.warn("no Kafka cluster for alerts: alert state is kept in memory only and a restart may fire alerts again");
        }
        Map<WebhookTarget, WebhookSink> webhooks = new LinkedHashMap<>();
        Map<String, List<AlertSink>> byStudy = new HashMap<>();
        studies.forEach((study, config) -> config.webhooks().forEach(target -> byStudy
                .computeIfAbsent(study, k -> new ArrayList<>())
                .add(webhooks.computeIfAbsent(target, t -> new WebhookSink(t, registry)))));
        return new AlertService(evaluator, new AlertDispatcher(common, byStudy, registry), recent, options);
    }

    /**
     * Judges a published report: one snapshot per assumption set, with the bands of its row (a
     * row without the study's configured band is not judged).
     */
    public void onReport(PublishedReport report) {
        for (BoundRow row : report.report().rows()) {
            onSnapshot(new BoundSnapshot(report.study(), row.assumptions(), report.window(), report.computedAt(),
                    report.report().pooled(), row.interval(), row.bands()));
        }
    }

    /** Judges one snapshot; evaluation and hand-over are one step, so each key's transitions leave in order. */
    public synchronized void onSnapshot(BoundSnapshot snapshot) {
        dispatcher.publish(evaluator.evaluate(snapshot));
    }

    /** See {@link AlertEvaluator#recordEvents}. */
    public void recordEvents(String study, long accepted, long rejected, long outOfRange) {
        evaluator.recordEvents(study, accepted, rejected, outOfRange);
    }

    /** Judges the per-study rules now (the scheduler calls it every tick). */
    public synchronized void tick() {
        try {
            dispatcher.publish(evaluator.tick());
        } catch (RuntimeException e) {
            LOG.error("alert tick failed; next tick will try again: {}", e.toString());
        }
    }

    /** The body of {@code GET /api/alerts}. */
    public ObjectNode apiView() {
        return AlertJson.listing(evaluator.firing(), recent.newestFirst());
    }

    public List<AlertState> firing() {
        return evaluator.firing();
    }

    /** Stops the clock and closes the sinks (webhooks get a few seconds to deliver what is pending). */
    @Override
    public void close() {
        clockThread.shutdownNow();
        dispatcher.close();
    }
}
