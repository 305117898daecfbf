package dev.bracket.stream.ingest;

/**
 * Told how many events of each study one committed transaction of the aggregator took in:
 * accepted, rejected (any reason, when the event names a configured study), and of the rejected
 * those outside the declared outcome range; and, apart, how many rejected records named no study
 * that could be read. Only committed work is told: an aborted transaction's records are told
 * once, when the transaction that redoes them commits.
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

    /** Rejected records of one committed transaction whose study could not be read (not JSON, no study field, unknown study, too large). */
    void unattributed(long rejected);
}
