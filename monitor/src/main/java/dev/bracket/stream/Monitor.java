package dev.bracket.stream;

import dev.bracket.alerts.AlertService;
import dev.bracket.config.BracketConfig;
import dev.bracket.config.StudyConfig;
import dev.bracket.report.LatestReports;
import io.micrometer.core.instrument.MeterRegistry;
import org.apache.kafka.clients.admin.Admin;

import java.time.Clock;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.Set;
import java.util.concurrent.atomic.AtomicBoolean;
import java.util.stream.Collectors;

/**
 * A running monitor instance against a Kafka cluster: topic setup, {@code threads} aggregation
 * group members and one member of the updater group, each on its own thread, and the alert
 * evaluator fed by both. Instances of one group share the studies: each study is updated and
 * judged by the instance that owns its partials partition ({@link BoundUpdater}), whose alert
 * state is restored from the alerts topic when it takes the study over. Start with {@link #start}; stop with
 * {@link #close} (final commits, then clients closed, then alert sinks drained).
 */
public final class Monitor implements AutoCloseable {

    private final List<StreamAggregator> aggregators;
    private final BoundUpdater updater;
    private final StreamMetrics metrics;
    private final AlertService alerts;
    private final List<Thread> threads = new ArrayList<>();
    private final AtomicBoolean closed = new AtomicBoolean();

    private Monitor(List<StreamAggregator> aggregators, BoundUpdater updater, StreamMetrics metrics, AlertService alerts) {
        this.aggregators = List.copyOf(aggregators);
        this.updater = updater;
        this.metrics = metrics;
        this.alerts = alerts;
        for (int i = 0; i < aggregators.size(); i++) {
            threads.add(new Thread(aggregators.get(i), "bracket-aggregator-" + i));
        }
        threads.add(new Thread(updater, "bracket-updater"));
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
        for (int member = 0; member < config.threads(); member++) {
            aggregators.add(new StreamAggregator(clients, metrics, partials, member));
        }
        Monitor m = new Monitor(aggregators,
                new BoundUpdater(clients, metrics, latest, partials, Clock.systemUTC(), alerts::onReport, new StudyOwnership() {
                    @Override
                    public void taken(Set<String> studies) {
                        alerts.take(studies);
                    }

                    @Override
                    public void released(Set<String> studies) {
                        alerts.release(studies);
                    }
                }, alerts::recordEvents), metrics, alerts);
        m.threads.forEach(Thread::start);
        return m;
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

    @Override
    public void close() {
        if (!closed.compareAndSet(false, true)) {
            return;
        }
        aggregators.forEach(a -> a.close(Duration.ofSeconds(30)));
        updater.close();
        for (Thread t : threads) {
            try {
                t.join(Duration.ofSeconds(30).toMillis());
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
            }
        }
        alerts.close();
    }
}
