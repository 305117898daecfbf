package dev.bracket.stream.ingest;

/**
 * Told how many events of each study the aggregator read in one poll: accepted, rejected, and of
 * the rejected those outside the declared outcome range. Events whose study cannot be read are
 * in no study's counts (they are in {@code bracket_events_rejected_total}). Counts are of work
 * done: after an aborted transaction the redone records are counted again.
 */
@FunctionalInterface
public interface StudyEventCounts {

    StudyEventCounts NONE = (study, accepted, rejected, outOfRange) -> { };

    void counted(String study, long accepted, long rejected, long outOfRange);
}
