package dev.bracket.stream.ingest;

/**
 * Told how many events of each study the aggregator read in one poll: accepted, rejected (any
 * reason, when the event names a configured study), and of the rejected those outside the
 * declared outcome range; and, apart, how many rejected records named no study that could be
 * read. Counts are of work done: after an aborted transaction the redone records are counted again.
 */
public interface StudyEventCounts {

    StudyEventCounts NONE = new StudyEventCounts() {
        @Override
        public void counted(String study, long accepted, long rejected, long outOfRange) {
        }

        @Override
        public void unattributed(long rejected) {
        }
    };

    void counted(String study, long accepted, long rejected, long outOfRange);

    /** Rejected records of one poll whose study could not be read (not JSON, no study field, unknown study, too large). */
    void unattributed(long rejected);
}
