package dev.bracket.stream.publish;

import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.StudyCells;
import dev.bracket.report.LostToFollowUp;
import dev.bracket.stream.ingest.FollowUpPanes;

import java.time.Duration;
import java.util.Map;

/**
 * Counts a study's units lost to follow-up from its follow-up panes ({@link FollowUpPanes}):
 * exposures by their time, outcomes by their {@code exposed} time, in buckets of a quarter of the
 * horizon. A bucket's pending units are lost once the whole bucket is older than the horizon, so
 * a unit is reported lost between 1 and 1.25 horizons after its exposure. Outcome events without
 * {@code exposed} cannot be placed in a bucket; their units then look pending there, so the count
 * is an upper bound unless outcome events carry {@code exposed}.
 */
final class FollowUpCount {

    private FollowUpCount() {
    }

    /** The lost units at the partials' watermark. */
    static LostToFollowUp at(String study, Duration horizon, MergedPartials partials) {
        long watermark = partials.watermark();
        long bucket = FollowUpPanes.bucketMillis(horizon);
        StudyCells old = partials.cells(study, FollowUpPanes.WINDOW,
                pane -> watermark != Long.MIN_VALUE && pane <= watermark - bucket - horizon.toMillis());
        long treated = 0;
        long control = 0;
        for (Map<String, ObservedArms> levels : old.byStratum().values()) {
            for (ObservedArms arms : levels.values()) {
                treated += arms.treated().pending();
                control += arms.control().pending();
            }
        }
        return new LostToFollowUp(treated, control, horizon);
    }
}
