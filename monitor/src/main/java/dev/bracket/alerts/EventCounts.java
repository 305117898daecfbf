package dev.bracket.alerts;

import java.time.Duration;
import java.time.Instant;
import java.util.ArrayDeque;

/**
 * One study's event traffic as the per-study rules need it: when the last event arrived, and
 * accepted / rejected / out-of-range counts over a sliding period kept in 20 buckets (so the
 * counted span is between 95% and 100% of the period). Mutable; {@link AlertEvaluator} guards it.
 */
final class EventCounts {

    private static final int BUCKETS = 20;

    private final Duration period;
    private final long bucketMillis;
    /** Each entry: bucket number, accepted, rejected, out of range; oldest first. */
    private final ArrayDeque<long[]> buckets = new ArrayDeque<>();
    private Instant lastEventAt;

    /**
     * @param start  stands in for the last event until one arrives, so a study that never sends
     *               counts as silent from the monitor's start
     * @param period the counting period
     */
    EventCounts(Instant start, Duration period) {
        this.lastEventAt = start;
        this.period = period;
        this.bucketMillis = Math.max(1, period.toMillis() / BUCKETS);
    }

    void record(Instant at, long accepted, long rejected, long outOfRange) {
        if (accepted < 0 || rejected < 0 || outOfRange < 0 || outOfRange > rejected) {
            throw new IllegalArgumentException("event counts must be >= 0 with out-of-range <= rejected (accepted="
                    + accepted + ", rejected=" + rejected + ", outOfRange=" + outOfRange + ")");
        }
        if (accepted + rejected == 0) {
            return;
        }
        if (at.isAfter(lastEventAt)) {
            lastEventAt = at;
        }
        long bucket = at.toEpochMilli() / bucketMillis;
        dropBefore(at);
        long[] last = buckets.peekLast();
        if (last == null || last[0] < bucket) {
            last = new long[] {bucket, 0, 0, 0};
            buckets.addLast(last);
        }
        last[1] += accepted;
        last[2] += rejected;
        last[3] += outOfRange;
    }

    /** Keeps memory bounded by the period even when nobody asks for the counts. */
    private void dropBefore(Instant now) {
        long oldest = (now.toEpochMilli() - period.toMillis()) / bucketMillis;
        while (!buckets.isEmpty() && buckets.peekFirst()[0] <= oldest) {
            buckets.removeFirst();
        }
    }

    Duration period() {
        return period;
    }

    Instant lastEventAt() {
        return lastEventAt;
    }

    /** Counts of the buckets that began within the period before {@code now}; older ones are dropped. */
    Evidence.OfQuality within(Instant now, double maxShare) {
        dropBefore(now);
        long accepted = 0;
        long rejected = 0;
        long outOfRange = 0;
        for (long[] b : buckets) {
            accepted += b[1];
            rejected += b[2];
            outOfRange += b[3];
        }
        return new Evidence.OfQuality(period, accepted, rejected, outOfRange, maxShare);
    }
}
