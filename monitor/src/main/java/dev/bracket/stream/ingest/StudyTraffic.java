package dev.bracket.stream.ingest;

/**
 * Events of one study read from one source partition since it was first read, as committed with
 * the partials: accepted, rejected, and of the rejected those outside the declared outcome range.
 * Cumulative, so the updater that owns the study sees the traffic of every instance's sources.
 */
public record StudyTraffic(long accepted, long rejected, long outOfRange) {

    public static final StudyTraffic NONE = new StudyTraffic(0, 0, 0);

    public StudyTraffic plus(long moreAccepted, long moreRejected, long moreOutOfRange) {
        return new StudyTraffic(accepted + moreAccepted, rejected + moreRejected, outOfRange + moreOutOfRange);
    }
}
