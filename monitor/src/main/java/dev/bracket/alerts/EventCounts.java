package dev.bracket.alerts;

import java.time.Duration;
import java.time.Instant;
import java.util.ArrayDeque;
import java.util.Optional;

/**
 * One study's event traffic as the per-study rules need it: when the last event arrived, and
 * accepted / rejected / out-of-range counts over a sliding period kept in 20 buckets (so the
 * counted span is between 95% and 100% of the period), with the rejected records no study could
 * be read from (unattributed) counted beside them. Mutable; {@link AlertEvaluator} guards it.
 */
final class EventCounts {

    private static final int BUCKETS = 20;

    private final Duration period;
    private final long bucketMillis;
    /** Each entry: bucket number, accepted, rejected, out of range, unattributed; oldest first. */
    private final ArrayDeque<long[]> buckets = new ArrayDeque<>();
    /** Null until an event arrives or a time from before the restart is restored. */
    private Instant lastEventAt;

    /** The counting period. */
    Duration period() {
        return period;
    }

    /** @param period the counting period */
    EventCounts(Duration period) {
        this.period = period;
        this.bucketMillis = Math.max(1, period.toMillis() / BUCKETS);
    }

    /** Counts the study's own events; any of them, rejected or not, ends a silence. */
    void record(Instant at, long accepted, long rejected, long outOfRange) {
        if (accepted < 0 || rejected < 0 || outOfRange < 0 || outOfRange > rejected) {
            throw new IllegalArgumentException("event counts must be >= 0 with out-of-range <= rejected (accepted="
                    + accepted + ", rejected=" + rejected + ", outOfRange=" + outOfRange + ")");
        }
        if (accepted + rejected == 0) {
            return;
        }
        if (lastEventAt == null || at.isAfter(lastEventAt)) {
            lastEventAt = at;
        }
        long[] bucket = bucketAt(at);
        bucket[1] += accepted;
        bucket[2] += rejected;
        bucket[3] += outOfRange;
    }

    /**
     * Counts rejected records whose study could not be read. They end no silence: nothing says
     * they came from this study.
     */
    void recordUnattributed(Instant at, long rejected) {
        if (rejected < 0) {
            throw new IllegalArgumentException("unattributed count must be >= 0, was " + rejected);
        }
        if (rejected > 0) {
            bucketAt(at)[4] += rejected;
        }
    }

    private long[] bucketAt(Instant at) {
        long bucket = at.toEpochMilli() / bucketMillis;
        dropBefore(at);
        long[] last = buckets.peekLast();
        if (last == null || last[0] < bucket) {
            last = new long[] {bucket, 0, 0, 0, 0};
            buckets.addLast(last);
        }
        return last;
    }

    /** Takes over the last event time recorded before a restart; call before any event is recorded. */
    void restoreLastEvent(Instant at) {
        lastEventAt = at;
    }

    /** Keeps memory bounded by the period even when nobody asks for the counts. */
    private void dropBefore(Instant now) {
        long oldest = (now.toEpochMilli() - period.toMillis()) / bucketMillis;
        while (!buckets.isEmpty() && buckets.peekFirst()[0] <= oldest) {
            buckets.removeFirst();
        }
    }

    Optional<Instant> lastEventAt() {
        return Optional.ofNullable(lastEventAt);
    }

    /** Counts of the buckets that began within the period before {@code now}; older ones are dropped. */
    Evidence.OfQuality within(Instant now, double maxShare) {
        dropBefore(now);
        long accepted = 0;
        long rejected = 0;
        long outOfRange = 0;
        long unattributed = 0;
        for (long[] b : buckets) {
            accepted += b[1];
            rejected += b[2];
            outOfRange += b[3];
            unattributed += b[4];
        }
        return new Evidence.OfQuality(period, accepted, rejected, outOfRange, unattributed, maxShare);
    }
}
