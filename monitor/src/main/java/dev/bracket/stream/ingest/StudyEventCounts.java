package dev.bracket.stream.ingest;

/**
 * Told by the bound updater how many events of a study it owns were newly committed by any
 * instance's aggregators (from the traffic counts in the partials' progress records): accepted,
 * rejected (any reason, when the event names a configured study), and of the rejected those
 * outside the declared outcome range; and, apart, how many rejected records named no study that
 * could be read, which count against every study since they may be any study's. Committed
 * counts: records redone after an aborted transaction are counted once.
 */
public interface StudyEventCounts {

    StudyEventCounts NONE = new StudyEventCounts() {
        @Override
        public void counted(String study, long accepted, long rejected, long outOfRange) {
        }

        @Override
        public void unattributed(String study, long rejected) {
        }
    };

    void counted(String study, long accepted, long rejected, long outOfRange);

    /**
     * Rejected records whose study could not be read (not JSON, no study field, unknown study, too
     * large), told once for each study the updater owns.
     */
    void unattributed(String study, long rejected);
}
