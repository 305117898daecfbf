package dev.bracket.stream.transaction;

import dev.bracket.stream.ingest.LateKey;
import dev.bracket.stream.ingest.RejectReason;

import java.util.HashMap;
import java.util.Map;

/**
 * The meter counts of one aggregation member's open transaction: accepted per input topic,
 * rejected per topic and reason, late per study and window. They reach the meters only when the
 * transaction commits ({@link #publish}); an aborted transaction's counts are dropped
 * ({@link #discard}), and its records, read again, are counted then. So the meters (and the
 * progress line read from them) count each input record once, as committed. The per-study
 * counts of the alert rules need no such care: they travel in the partials' progress records,
 * committed with the transaction. One writer, no locking.
 */
final class CommittedCounts {

    private final Map<String, long[]> accepted = new HashMap<>();
    /** Keyed by topic and reason. */
    private final Map<TopicReason, long[]> rejected = new HashMap<>();
    private final Map<LateKey, long[]> late = new HashMap<>();

    private record TopicReason(String topic, RejectReason reason) {
    }

    /** Adds {@code n} accepted events of one topic (once per partition and poll, not per event). */
    void accepted(String topic, long n) {
        accepted.computeIfAbsent(topic, t -> new long[1])[0] += n;
    }

    void rejected(String topic, RejectReason reason) {
        rejected.computeIfAbsent(new TopicReason(topic, reason), k -> new long[1])[0]++;
    }

    void late(String study, String window) {
        late.computeIfAbsent(new LateKey(study, window), k -> new long[1])[0]++;
    }

    /** After a commit: adds the counts to the meters and starts again from zero. */
    void publish(StreamMetrics metrics) {
        accepted.forEach((topic, n) -> metrics.accepted(topic, n[0]));
        rejected.forEach((k, n) -> metrics.rejected(k.topic(), k.reason(), n[0]));
        late.forEach((k, n) -> metrics.late(k.study(), k.window(), n[0]));
        discard();
    }

    /** After an abort: forgets the counts (the records are read and counted again). */
    void discard() {
        accepted.clear();
        rejected.clear();
        late.clear();
    }
}
