package dev.bracket.stream;

import dev.bracket.alerts.AlertService;
import dev.bracket.config.BracketConfig;
import dev.bracket.config.StudyConfig;
import dev.bracket.report.LatestReports;
import io.micrometer.core.instrument.MeterRegistry;
import org.apache.kafka.clients.admin.Admin;

import java.time.Clock;
import java.time.Duration;
import java.util.Optional;
import java.util.stream.Collectors;

/**
 * A running monitor instance against a Kafka cluster: topic setup, one aggregation group
 * member and one bound updater, each on its own thread, and the alert evaluator fed by both
 * (state restored from the alerts topic at start). Start with {@link #start}; stop with
 * {@link #close} (final commit, then clients closed, then alert sinks drained).
 */
public final class Monitor implements AutoCloseable {

    private final StreamAggregator aggregator;
    private final BoundUpdater updater;
    private final StreamMetrics metrics;
    private final AlertService alerts;
    private final Thread aggregatorThread;
    private final Thread updaterThread;

    private Monitor(StreamAggregator aggregator, BoundUpdater updater, StreamMetrics metrics, AlertService alerts) {
        this.aggregator = aggregator;
        this.updater = updater;
        this.metrics = metrics;
        this.alerts = alerts;
        this.aggregatorThread = new Thread(aggregator, "bracket-aggregator");
        this.updaterThread = new Thread(updater, "bracket-updater");
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
        AlertService alerts = AlertService.start(
                config.studies().stream().collect(Collectors.toMap(StudyConfig::id, StudyConfig::alerts)),
                config.alerts(), Optional.of(config.kafka()), registry, Clock.systemUTC());
        Monitor m = new Monitor(new StreamAggregator(clients, metrics, partials, alerts::recordEvents),
                new BoundUpdater(clients, metrics, latest, partials, Clock.systemUTC(), alerts::onReport), metrics, alerts);
        m.aggregatorThread.start();
        m.updaterThread.start();
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
        aggregator.close(Duration.ofSeconds(30));
        updater.close();
        join(aggregatorThread);
        join(updaterThread);
        alerts.close();
    }

    private static void join(Thread t) {
        try {
            t.join(Duration.ofSeconds(30).toMillis());
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
    }
}
