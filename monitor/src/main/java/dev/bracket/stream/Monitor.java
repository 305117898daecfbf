package dev.bracket.stream;

import dev.bracket.config.BracketConfig;
import dev.bracket.report.LatestReports;
import io.micrometer.core.instrument.MeterRegistry;
import org.apache.kafka.clients.admin.Admin;

import java.time.Clock;
import java.time.Duration;

/**
 * A running monitor instance against a Kafka cluster: topic setup, one aggregation group
 * member and one bound updater, each on its own thread. Start with {@link #start}; stop with
 * {@link #close} (final commit, then clients closed).
 */
public final class Monitor implements AutoCloseable {

    private final StreamAggregator aggregator;
    private final BoundUpdater updater;
    private final StreamMetrics metrics;
    private final Thread aggregatorThread;
    private final Thread updaterThread;
    private final java.util.concurrent.atomic.AtomicBoolean closed = new java.util.concurrent.atomic.AtomicBoolean();

    private Monitor(StreamAggregator aggregator, BoundUpdater updater, StreamMetrics metrics) {
        this.aggregator = aggregator;
        this.updater = updater;
        this.metrics = metrics;
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
        Monitor m = new Monitor(new StreamAggregator(clients, metrics, partials),
                new BoundUpdater(clients, metrics, latest, partials, Clock.systemUTC()), metrics);
        m.aggregatorThread.start();
        m.updaterThread.start();
        return m;
    }

    public StreamMetrics metrics() {
        return metrics;
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
        aggregator.close(Duration.ofSeconds(30));
        updater.close();
        join(aggregatorThread);
        join(updaterThread);
    }

    private static void join(Thread t) {
        try {
            t.join(Duration.ofSeconds(30).toMillis());
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
    }
}
