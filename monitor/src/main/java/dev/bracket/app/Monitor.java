package dev.bracket.app;

import dev.bracket.stream.ingest.StudyEventCounts;
import dev.bracket.stream.publish.BoundUpdater;
import dev.bracket.stream.publish.StudyOwnership;
import dev.bracket.stream.transaction.KafkaClients;
import dev.bracket.stream.transaction.StreamAggregator;
import dev.bracket.stream.transaction.StreamMetrics;
import dev.bracket.alerts.delivery.AlertService;
import dev.bracket.config.BracketConfig;
import dev.bracket.config.StudyConfig;
import dev.bracket.report.store.LatestReports;
import io.micrometer.core.instrument.Gauge;
import io.micrometer.core.instrument.MeterRegistry;
import org.apache.kafka.clients.admin.Admin;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

import java.time.Clock;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicBoolean;
import java.util.function.Consumer;
import java.util.stream.Collectors;

/**
 * A running monitor instance against a Kafka cluster: topic setup, {@code group-members} aggregation
 * group members and one member of the updater group, each on its own thread, and the alert
 * evaluator fed by the updater. Instances of one group share the studies: each study is updated
 * and judged by the instance that owns its partials partition ({@link BoundUpdater}), whose alert
 * state is restored from the alerts topic and its ledger when it takes the study over. Start with {@link #start}; stop with
 * {@link #close} (final commits, then clients closed, then alert sinks drained).
 *
 * <p>A supervisor thread watches the others once a second. A member or the updater that stops
 * for any reason other than {@link #close} is a failure: the numbers would silently go stale,
 * so it is reported once to the {@link #onFailure} handler (the commands exit non-zero). Every ten
 * seconds it asks whether Kafka answers and logs one line while it does not, or while a member
 * has waited for its partitions from the group, saying for how long.
 */
public final class Monitor implements AutoCloseable {

    private static final Logger LOG = LoggerFactory.getLogger(Monitor.class);
    private static final long WAIT_LOG_MILLIS = 10_000;

    private final BracketConfig config;
    private final List<StreamAggregator> aggregators;
    private final BoundUpdater updater;
    private final StreamMetrics metrics;
    private final AlertService alerts;
    private final BrokerProbe probe;
    private final HealthChecks health;
    private final List<Thread> threads = new ArrayList<>();
    private final Map<String, Throwable> deaths = new ConcurrentHashMap<>();
    private final Thread supervisor;
    private final AtomicBoolean closed = new AtomicBoolean();
    private final AtomicBoolean failed = new AtomicBoolean();
    private volatile Consumer<String> onFailure = why -> LOG.error("{}", why);
    private long lastWaitCheckMillis = System.currentTimeMillis();
    private long unreachableSinceMillis;

    private Monitor(BracketConfig config, List<StreamAggregator> aggregators, BoundUpdater updater, StreamMetrics metrics,
                    AlertService alerts, BrokerProbe probe) {
        this.config = config;
        this.aggregators = List.copyOf(aggregators);
        this.updater = updater;
        this.metrics = metrics;
        this.alerts = alerts;
        this.probe = probe;
        for (int i = 0; i < aggregators.size(); i++) {
            threads.add(new Thread(aggregators.get(i), "bracket-aggregator-" + i));
        }
        threads.add(new Thread(updater, "bracket-updater"));
        threads.forEach(t -> t.setUncaughtExceptionHandler((thread, e) -> {
            deaths.put(thread.getName(), e);
            LOG.error("thread {} failed", thread.getName(), e);
        }));
        this.health = new HealthChecks(this.aggregators, updater, threads, probe, config);
        this.supervisor = new Thread(this::supervise, "bracket-supervisor");
        supervisor.setDaemon(true);
        Gauge.builder("bracket.last.commit.age", health, HealthChecks::oldestCommitAgeSeconds).baseUnit("seconds")
                .description("Seconds since the aggregation member that is furthest behind last committed (or found nothing to commit)")
                .register(metrics.registry());
        Gauge.builder("bracket.last.report.age", health, HealthChecks::reportAgeSeconds).baseUnit("seconds")
                .description("Seconds since the last bound document was published (NaN before the first)")
                .register(metrics.registry());
    }

    /**
     * Creates missing topics and starts consuming.
     *
     * @param config   must name {@code bootstrap.servers} (start an embedded broker first otherwise)
     * @param registry where the meters go (a Prometheus registry for {@code /metrics})
     * @param latest   receives every published report
     */
    public static Monitor start(BracketConfig config, MeterRegistry registry, LatestReports latest) {
        if (config.usesEmbeddedBroker()) {
            throw new IllegalArgumentException("no bootstrap.servers configured; start the embedded broker first");
        }
        KafkaClients clients = new KafkaClients(config);
        int partials;
        try (Admin admin = clients.admin()) {
            partials = TopicSetup.ensureTopics(admin, config);
        }
        StreamMetrics metrics = new StreamMetrics(registry);
        AlertService alerts = AlertService.startShared(
                config.studies().stream().collect(Collectors.toMap(StudyConfig::id, StudyConfig::alerts)),
                config.alerts(), config.kafka(), registry, Clock.systemUTC());
        List<StreamAggregator> aggregators = new ArrayList<>();
        for (int member = 0; member < config.groupMembers(); member++) {
            aggregators.add(new StreamAggregator(clients, metrics, partials, member));
        }
        StudyOwnership ownership = new StudyOwnership() {
            @Override
            public void taken(Set<String> studies) {
                alerts.take(studies);
            }

            @Override
            public void released(Set<String> studies) {
                alerts.release(studies);
            }
        };
        StudyEventCounts traffic = new StudyEventCounts() {
            @Override
            public void counted(String study, long accepted, long rejected, long outOfRange) {
                alerts.recordEvents(study, accepted, rejected, outOfRange);
            }

            @Override
            public void unattributed(String study, long rejected) {
                alerts.recordUnattributed(study, rejected);
            }
        };
        Monitor m = new Monitor(config, aggregators,
                new BoundUpdater(clients, metrics, latest, partials, Clock.systemUTC(), alerts::onReport, ownership, traffic),
                metrics, alerts,
                new BrokerProbe(clients.admin()));
        m.threads.forEach(Thread::start);
        m.supervisor.start();
        return m;
    }

    /**
     * Who is told, once, that a thread of this monitor stopped on its own (the one-line reason).
     * The default only logs it; the commands exit non-zero.
     */
    public void onFailure(Consumer<String> handler) {
        this.onFailure = handler;
    }

    /** Whether a thread of this monitor stopped on its own (the failure was reported). */
    public boolean failed() {
        return failed.get();
    }

    public StreamMetrics metrics() {
        return metrics;
    }

    /** The alert evaluator and its sinks ({@code GET /api/alerts} reads {@link AlertService#apiView()}). */
    public AlertService alerts() {
        return alerts;
    }

    /** Input partitions this instance currently aggregates. */
    public int assignedPartitions() {
        return metrics.assignedPartitions();
    }

    /** {@code GET /health/live}: every thread of the monitor runs. See {@link HealthChecks}. */
    public Map<String, Object> liveness() {
        return health.liveness();
    }

    /** {@code GET /health/ready}: see {@link HealthChecks#readiness()}. */
    public Map<String, Object> readiness() {
        return health.readiness();
    }

    private void supervise() {
        while (!closed.get()) {
            for (Thread t : threads) {
                if (!t.isAlive() && !closed.get() && failed.compareAndSet(false, true)) {
                    Throwable cause = deaths.get(t.getName());
                    onFailure.accept("thread " + t.getName() + " of the monitor stopped"
                            + (cause == null ? "" : " (" + cause + ")") + "; its numbers would go stale");
                }
            }
            logWaiting();
            try {
                TimeUnit.SECONDS.sleep(1);
            } catch (InterruptedException e) {
                return;
            }
        }
    }

    /**
     * Every ten seconds: asks whether Kafka answers, and logs one line while it does not, or while
     * a member has waited ten seconds or more for its partitions (the group is forming).
     */
    private void logWaiting() {
        long now = System.currentTimeMillis();
        if (now - lastWaitCheckMillis < WAIT_LOG_MILLIS) {
            return;
        }
        lastWaitCheckMillis = now;
        if (!probe.reachable()) {
            unreachableSinceMillis = unreachableSinceMillis == 0 ? now : unreachableSinceMillis;
            LOG.warn("bracket: Kafka at {} unreachable for {} s; still retrying", config.kafka().get(BracketConfig.BOOTSTRAP_SERVERS),
                    (now - unreachableSinceMillis) / 1000);
            return;
        }
        if (unreachableSinceMillis != 0) {
            LOG.info("bracket: Kafka at {} reachable again after {} s", config.kafka().get(BracketConfig.BOOTSTRAP_SERVERS),
                    (now - unreachableSinceMillis) / 1000);
            unreachableSinceMillis = 0;
        }
        long since = Long.MAX_VALUE;
        for (StreamAggregator a : aggregators) {
            StreamAggregator.Status s = a.status();
            if (!s.assigned() && s.failure() == null) {
                since = Math.min(since, s.unassignedSince());
            }
        }
        if (since != Long.MAX_VALUE && now - since >= WAIT_LOG_MILLIS) {
            LOG.warn("bracket: waiting {} s for consumer group '{}' to assign input partitions (Kafka is reachable; the group is forming)",
                    (now - since) / 1000, config.group());
        }
    }

    @Override
    public void close() {
        if (!closed.compareAndSet(false, true)) {
            return;
        }
        supervisor.interrupt();
        aggregators.forEach(a -> a.close(Duration.ofSeconds(30)));
        updater.close();
        for (Thread t : threads) {
            try {
                t.join(Duration.ofSeconds(30).toMillis());
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
            }
        }
        probe.close();
        alerts.close();
    }
}
