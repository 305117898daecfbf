package dev.bracket.stream;

/**
 * Told by the bound updater how many events of a study it owns were newly committed by any
 * instance's aggregators (from the traffic counts in the partials' progress records):
 * accepted, rejected, and of the rejected those outside the declared outcome range. Events whose
 * study cannot be read are in no study's counts (they are in {@code bracket_events_rejected_total}).
 * Committed counts: records redone after an aborted transaction are counted once.
 */
@FunctionalInterface
public interface StudyEventCounts {

    StudyEventCounts NONE = (study, accepted, rejected, outOfRange) -> { };

    void counted(String study, long accepted, long rejected, long outOfRange);
}
