package dev.bracket.alerts;

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
import java.util.Set;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.Executors;
import java.util.concurrent.ScheduledExecutorService;
import java.util.concurrent.TimeUnit;
import java.util.function.Function;

/**
 * Alerting as the monitor runs it: the evaluator, its sinks and its clock. The bound updater
 * calls {@link #onReport} after each update, the event consumer {@link #recordEvents}; a
 * scheduler judges the per-study rules every {@link AlertOptions#tick()}. At start, state is
 * restored from the alerts topic, so a restart does not fire again what already fired.
 *
 * <p>When several instances share the studies ({@link #startShared}), this one judges only the
 * studies it owns: {@link #take} restores their state from the alerts topic before the first
 * judgement, {@link #release} stops judging them and drops their state.
 */
public final class AlertService implements AutoCloseable {

    private static final Logger LOG = LoggerFactory.getLogger(AlertService.class);

    private final AlertEvaluator evaluator;
    private final AlertDispatcher dispatcher;
    private final RecentAlerts recent;
    private final ScheduledExecutorService clockThread;
    private final Set<String> owned = ConcurrentHashMap.newKeySet();
    private Function<Set<String>, List<AlertState>> history = studies -> List.of();

    /** Wires given parts and starts the clock; {@link #start} builds the parts from configuration. */
    public AlertService(AlertEvaluator evaluator, AlertDispatcher dispatcher, RecentAlerts recent, AlertOptions options) {
        this.evaluator = evaluator;
        this.dispatcher = dispatcher;
        this.recent = recent;
        this.owned.addAll(evaluator.studies());
        this.clockThread = Executors.newSingleThreadScheduledExecutor(r -> {
            Thread t = new Thread(r, "bracket-alerts-clock");
            t.setDaemon(true);
            return t;
        });
        long tick = options.tick().toMillis();
        clockThread.scheduleWithFixedDelay(this::tick, tick, tick, TimeUnit.MILLISECONDS);
    }

    /**
     * Restores state from the alerts topic (when a broker is given), then starts evaluating.
     *
     * @param studies each study's alert settings, by study id
     * @param kafka   client properties of the Kafka cluster holding the alerts topic; empty for no
     *                topic (state then lives in memory only, and a restart may fire again)
     */
    public static AlertService start(Map<String, StudyAlertConfig> studies, AlertOptions options,
                                     Optional<Map<String, String>> kafka, MeterRegistry registry, Clock clock) {
        AlertService service = build(studies, options, kafka, registry, clock);
        service.take(studies.keySet());
        return service;
    }

    /**
     * Like {@link #start}, but owning no study until {@link #take} (instances sharing the studies
     * through the updater group).
     */
    public static AlertService startShared(Map<String, StudyAlertConfig> studies, AlertOptions options,
                                           Map<String, String> kafka, MeterRegistry registry, Clock clock) {
        AlertService service = build(studies, options, Optional.of(kafka), registry, clock);
        service.release(studies.keySet());
        return service;
    }

    private static AlertService build(Map<String, StudyAlertConfig> studies, AlertOptions options,
                                      Optional<Map<String, String>> kafka, MeterRegistry registry, Clock clock) {
        AlertEvaluator evaluator = new AlertEvaluator(studies, clock);
        RecentAlerts recent = new RecentAlerts(options.recent());
        List<AlertSink> common = new ArrayList<>(List.of(new LogAlertSink(), recent));
        Function<Set<String>, List<AlertState>> history = owned -> List.of();
        if (kafka.isPresent()) {
            history = owned -> AlertHistory.read(kafka.get(), options.topic(), options.restoreTimeout()).stream()
                    .filter(s -> owned.contains(s.key().study())).toList();
            common.add(KafkaAlertSink.connect(kafka.get(), options.topic(), registry));
        } else {
            LOG.warn("no Kafka cluster for alerts: alert state is kept in memory only and a restart may fire alerts again");
        }
        Map<WebhookTarget, WebhookSink> webhooks = new LinkedHashMap<>();
        Map<String, List<AlertSink>> byStudy = new HashMap<>();
        studies.forEach((study, config) -> config.webhooks().forEach(target -> byStudy
                .computeIfAbsent(study, k -> new ArrayList<>())
                .add(webhooks.computeIfAbsent(target, t -> new WebhookSink(t, registry)))));
        AlertService service = new AlertService(evaluator, new AlertDispatcher(common, byStudy, registry), recent, options);
        service.history = history;
        return service;
    }

    /**
     * Starts judging {@code studies}, after restoring their state from the alerts topic: what
     * the previous owner fired stays fired, and is not announced again.
     */
    public synchronized void take(Set<String> studies) {
        evaluator.forget(studies); // traffic counted from now: silence before the take-over is not ours to judge
        evaluator.restore(history.apply(studies));
        owned.addAll(studies);
    }

    /** Stops judging {@code studies} and drops their state. */
    public synchronized void release(Set<String> studies) {
        owned.removeAll(studies);
        evaluator.forget(studies);
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
        if (owned.contains(snapshot.study())) {
            dispatcher.publish(evaluator.evaluate(snapshot));
        }
    }

    /** See {@link AlertEvaluator#recordEvents}. */
    public void recordEvents(String study, long accepted, long rejected, long outOfRange) {
        evaluator.recordEvents(study, accepted, rejected, outOfRange);
    }

    /** Judges the per-study rules now (the scheduler calls it every tick). */
    public synchronized void tick() {
        try {
            dispatcher.publish(evaluator.tick(owned));
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
