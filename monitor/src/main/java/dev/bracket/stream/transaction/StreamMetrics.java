package dev.bracket.stream.transaction;

import dev.bracket.stream.ingest.RejectReason;
import io.micrometer.core.instrument.Counter;
import io.micrometer.core.instrument.Gauge;
import io.micrometer.core.instrument.MeterRegistry;
import io.micrometer.core.instrument.Timer;

import java.util.Map;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.atomic.AtomicInteger;

/**
 * The monitor's meters, registered in the registry it is given. Names follow Prometheus
 * conventions once exported (Micrometer adds {@code _total} and {@code _seconds}):
 *
 * <ul>
 *   <li>{@code bracket_events_total{topic, result="accepted"|"rejected"}}</li>
 *   <li>{@code bracket_events_rejected_total{topic, reason}} — reasons as in {@link RejectReason}</li>
 *   <li>{@code bracket_events_late_total{study, window}} — left out of a closed window pane</li>
 *   <li>{@code bracket_transactions_total{result="committed"|"aborted"}} and {@code bracket_transaction_duration_seconds}</li>
 *   <li>{@code bracket_partitions_restored_total} and gauge {@code bracket_partitions_assigned}</li>
 *   <li>{@code bracket_reports_published_total{study}}</li>
 * </ul>
 *
 * The event counters ({@code bracket_events_total}, {@code bracket_events_rejected_total},
 * {@code bracket_events_late_total}) count committed work: the aggregator adds a transaction's
 * counts after it commits and drops them when it aborts, so each input record counts once.
 */
public final class StreamMetrics {

    private final MeterRegistry registry;
    private final Map<String, Counter> accepted = new ConcurrentHashMap<>();
    private final Map<String, Counter> rejected = new ConcurrentHashMap<>();
    private final Map<String, Counter> rejectedByReason = new ConcurrentHashMap<>();
    private final Map<String, Counter> late = new ConcurrentHashMap<>();
    private final Map<String, Counter> published = new ConcurrentHashMap<>();
    private final Counter committed;
    private final Counter aborted;
    private final Counter restores;
    private final Timer commitTime;
    private final AtomicInteger assigned = new AtomicInteger();

    public StreamMetrics(MeterRegistry registry) {
        this.registry = registry;
        // One help text for both results: Prometheus shows a single one per metric name.
        String transactions = "Kafka transactions of partial statistics and input offsets, by result:"
                + " committed, or aborted after an error (their input is processed again)";
        committed = Counter.builder("bracket.transactions").tag("result", "committed").description(transactions).register(registry);
        aborted = Counter.builder("bracket.transactions").tag("result", "aborted").description(transactions).register(registry);
        restores = Counter.builder("bracket.partitions.restored")
                .description("Input partitions whose statistics were restored from the partials topic").register(registry);
        commitTime = Timer.builder("bracket.transaction.duration").description("Time to write partials and commit one transaction").register(registry);
        Gauge.builder("bracket.partitions.assigned", assigned, AtomicInteger::get)
                .description("Input partitions this monitor instance reads now").register(registry);
    }

    public MeterRegistry registry() {
        return registry;
    }

    void accepted(String topic, long n) {
        accepted.computeIfAbsent(topic, t -> Counter.builder("bracket.events").tag("topic", t).tag("result", "accepted")
                .description("Events read from input topics and committed, by result").register(registry)).increment(n);
    }

    void rejected(String topic, RejectReason reason, long n) {
        rejected.computeIfAbsent(topic, t -> Counter.builder("bracket.events").tag("topic", t).tag("result", "rejected")
                .description("Events read from input topics and committed, by result").register(registry)).increment(n);
        rejectedByReason.computeIfAbsent(topic + '\u0000' + reason.id(), k -> Counter.builder("bracket.events.rejected")
                .tag("topic", topic).tag("reason", reason.id())
                .description("Events sent to the rejected topic, by reason").register(registry)).increment(n);
    }

    void late(String study, String window, long n) {
        late.computeIfAbsent(study + '\u0000' + window, k -> Counter.builder("bracket.events.late").tag("study", study)
                .tag("window", window).description("Events too late for a closed window pane (still counted in open windows)")
                .register(registry)).increment(n);
    }

    public void published(String study) {
        published.computeIfAbsent(study, s -> Counter.builder("bracket.reports.published").tag("study", s)
                .description("Bound documents published").register(registry)).increment();
    }

    void committed() {
        committed.increment();
    }

    void aborted() {
        aborted.increment();
    }

    void restored(int partitions) {
        restores.increment(partitions);
    }

    Timer commitTimer() {
        return commitTime;
    }

    void partitionsOwnedChanged(int delta) {
        assigned.addAndGet(delta);
    }

    /** Input partitions this instance's aggregation members own now. */
    public int assignedPartitions() {
        return assigned.get();
    }

    /** Sum of a counter over all its tag values; for progress lines. */
    public long total(String name, String... tags) {
        return (long) registry.find(name).tags(tags).counters().stream().mapToDouble(Counter::count).sum();
    }
}
