package dev.bracket.alerts.delivery;

import dev.bracket.alerts.WebhookTarget;
import dev.bracket.alerts.AlertEvaluator;
import dev.bracket.alerts.AlertState;
import dev.bracket.alerts.AlertsConfig;
import dev.bracket.alerts.BoundSnapshot;
import dev.bracket.alerts.StudyAlertConfig;
import com.fasterxml.jackson.databind.node.ObjectNode;
import dev.bracket.report.BoundRow;
import dev.bracket.report.store.PublishedReport;
import io.micrometer.core.instrument.Gauge;
import io.micrometer.core.instrument.MeterRegistry;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.HashSet;
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
 * scheduler judges the per-study rules every {@link AlertsConfig#checkInterval()} and records each
 * study's last event time in the {@link AlertLedger}. At start, state is restored from the alerts
 * topic and the ledger, so a restart neither fires again what already fired nor resolves a stall
 * that did not end, and webhooks resume what they had not delivered.
 *
 * <p>When several instances share the studies ({@link #startShared}), this one judges only the
 * studies it owns: {@link #take} restores their state, last event times and owed webhook
 * deliveries before the first judgement, {@link #release} stops judging them and drops their state.
 */
public final class AlertService implements AutoCloseable {

    private static final Logger LOG = LoggerFactory.getLogger(AlertService.class);

    private final AlertEvaluator evaluator;
    private final AlertDispatcher dispatcher;
    private final RecentAlerts recent;
    private final AlertLedger ledger;
    private final ScheduledExecutorService clockThread;
    private final Set<String> owned = ConcurrentHashMap.newKeySet();
    private Function<Set<String>, AlertHistory.Restored> history = studies -> new AlertHistory.Restored(List.of(), List.of());
    private Map<WebhookTarget, WebhookSink> webhooks = Map.of();
    private Map<WebhookTarget, Set<String>> served = Map.of();

    /** Wires given parts and starts the clock, with a ledger in memory. */
    public AlertService(AlertEvaluator evaluator, AlertDispatcher dispatcher, RecentAlerts recent, AlertsConfig options) {
        this(evaluator, dispatcher, recent, options, AlertLedger.inMemory());
    }

    /** Wires given parts and starts the clock; {@link #start} builds the parts from configuration. */
    public AlertService(AlertEvaluator evaluator, AlertDispatcher dispatcher, RecentAlerts recent, AlertsConfig options,
                        AlertLedger ledger) {
        this.evaluator = evaluator;
        this.dispatcher = dispatcher;
        this.recent = recent;
        this.ledger = ledger;
        this.owned.addAll(evaluator.studies());
        this.clockThread = Executors.newSingleThreadScheduledExecutor(r -> {
            Thread t = new Thread(r, "bracket-alerts-clock");
            t.setDaemon(true);
            return t;
        });
        long tick = options.checkInterval().toMillis();
        clockThread.scheduleWithFixedDelay(this::tick, tick, tick, TimeUnit.MILLISECONDS);
    }

    /**
     * Restores state from the alerts topic and its ledger (when a broker is given), queues the
     * webhook deliveries still owed, then starts evaluating.
     *
     * @param studies each study's alert settings, by study id
     * @param kafka   client properties of the Kafka cluster holding the alerts topic; empty for no
     *                topic (state then lives in memory only, and a restart may fire again)
     */
    public static AlertService start(Map<String, StudyAlertConfig> studies, AlertsConfig options,
                                     Optional<Map<String, String>> kafka, MeterRegistry registry, Clock clock) {
        AlertService service = build(studies, options, kafka, registry, clock);
        service.take(studies.keySet());
        return service;
    }

    /**
     * Like {@link #start}, but owning no study until {@link #take} (instances sharing the studies
     * through the updater group).
     */
    public static AlertService startShared(Map<String, StudyAlertConfig> studies, AlertsConfig options,
                                           Map<String, String> kafka, MeterRegistry registry, Clock clock) {
        AlertService service = build(studies, options, Optional.of(kafka), registry, clock);
        service.release(studies.keySet());
        return service;
    }

    private static AlertService build(Map<String, StudyAlertConfig> studies, AlertsConfig options,
                                      Optional<Map<String, String>> kafka, MeterRegistry registry, Clock clock) {
        AlertEvaluator evaluator = new AlertEvaluator(studies, clock);
        // Per study, so Prometheus can tell a silent study from a busy one (stalled-stream rules).
        studies.keySet().forEach(study -> Gauge.builder("bracket.last.event.timestamp", evaluator,
                        e -> e.lastEvents().get(study).toEpochMilli() / 1000.0)
                .description("When the study's last event arrived, Unix time (the monitor's start until one has)")
                .tag("study", study).baseUnit("seconds").register(registry));
        RecentAlerts recent = new RecentAlerts(options.recentTransitions());
        List<AlertSink> common = new ArrayList<>(List.of(new LogAlertSink(), recent));
        AlertLedger ledger;
        Function<Set<String>, AlertHistory.Restored> history;
        if (kafka.isPresent()) {
            Duration lookback = studies.values().stream().flatMap(c -> c.webhooks().stream()).map(WebhookTarget::retryFor)
                    .max(Comparator.naturalOrder()).orElse(Duration.ZERO);
            history = taken -> {
                AlertHistory.Restored all = AlertHistory.read(kafka.get(), options.topic(), options.restoreTimeout(),
                        clock.instant().minus(lookback));
                return new AlertHistory.Restored(
                        all.states().stream().filter(st -> taken.contains(st.key().study())).toList(),
                        all.since().stream().filter(d -> taken.contains(d.key().study())).toList());
            };
            ledger = AlertLedger.open(kafka.get(), AlertLedger.topicFor(options.topic()), options.restoreTimeout());
            common.add(KafkaAlertSink.connect(kafka.get(), options.topic(), registry));
        } else {
            LOG.warn("no Kafka cluster for alerts: alert state is kept in memory only and a restart may fire alerts again");
            ledger = AlertLedger.inMemory();
            history = taken -> new AlertHistory.Restored(List.of(), List.of());
        }
        Map<WebhookTarget, WebhookSink> webhooks = new LinkedHashMap<>();
        Map<WebhookTarget, Set<String>> served = new HashMap<>();
        Map<String, List<AlertSink>> byStudy = new HashMap<>();
        studies.forEach((study, config) -> config.webhooks().forEach(target -> {
            byStudy.computeIfAbsent(study, k -> new ArrayList<>())
                    .add(webhooks.computeIfAbsent(target, t -> new WebhookSink(t, registry, ledger)));
            served.computeIfAbsent(target, t -> new HashSet<>()).add(study);
        }));
        AlertService service = new AlertService(evaluator, new AlertDispatcher(common, byStudy, registry), recent, options,
                ledger);
        service.history = history;
        service.webhooks = webhooks;
        service.served = served;
        return service;
    }

    /**
     * Starts judging {@code studies}, after restoring their state from the alerts topic (what the
     * previous owner fired stays fired, and is not announced again), their last event times from
     * the ledger (a stall is judged from the last event, not from the take-over), and queuing the
     * webhook deliveries still owed for them.
     */
    public synchronized void take(Set<String> studies) {
        evaluator.forget(studies);
        AlertHistory.Restored restored = history.apply(studies);
        ledger.reread();
        evaluator.restore(restored.states());
        // A study the ledger knows nothing of (never owned, or owned too briefly to record) counts as
        // silent from the take-over rather than from this instance's start.
        Instant now = evaluator.now();
        Map<String, Instant> recorded = ledger.lastEvents();
        Map<String, Instant> lastEvents = new HashMap<>();
        studies.forEach(study -> lastEvents.put(study, recorded.getOrDefault(study, now)));
        evaluator.restoreLastEvents(lastEvents);
        webhooks.forEach((target, sink) -> {
            Set<String> its = served.get(target);
            sink.resume(restored.since().stream().filter(d -> its.contains(d.key().study())).toList(), now);
        });
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

    /** See {@link AlertEvaluator#recordUnattributed}. */
    public void recordUnattributed(String study, long rejected) {
        evaluator.recordUnattributed(study, rejected);
    }

    /** Judges the per-study rules now and records the last event times (the scheduler calls it every tick). */
    public synchronized void tick() {
        try {
            dispatcher.publish(evaluator.tick(owned));
            evaluator.lastEvents().forEach((study, at) -> {
                if (owned.contains(study)) {
                    ledger.recordLastEvent(study, at);
                }
            });
        } catch (RuntimeException e) {
            LOG.error("alert tick failed; next tick will try again: {}", e.toString());
        }
    }

    /** The body of {@code GET /api/alerts}. */
    public ObjectNode apiView() {
        return AlertJson.listing(evaluator.firing(), recent.newestFirst(), evaluator.lastEvents(), evaluator.now());
    }

    public List<AlertState> firing() {
        return evaluator.firing();
    }

    /**
     * Stops the clock and closes the sinks (webhooks get a few seconds to deliver what is pending;
     * what is left stays owed in the ledger), then the ledger.
     */
    @Override
    public void close() {
        clockThread.shutdownNow();
        dispatcher.close();
        ledger.close();
    }
}
