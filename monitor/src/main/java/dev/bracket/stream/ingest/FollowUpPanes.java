package dev.bracket.stream.ingest;

import java.time.Duration;

/**
 * Where a study with a follow-up horizon counts its exposures and outcomes by exposure time:
 * panes of the window {@link #WINDOW}, in buckets of a quarter of the horizon, never late and
 * never evicted, from which the lost-to-follow-up count is read.
 */
public final class FollowUpPanes {

    /** Name of the window of the follow-up panes; not a configurable window name. */
    public static final String WINDOW = "#follow-up";

    private FollowUpPanes() {
    }

    /** Bucket width for a horizon: a quarter of it, at least one millisecond. */
    public static long bucketMillis(Duration horizon) {
        return Math.max(1, horizon.toMillis() / 4);
    }
}
