package dev.bracket.stream.publish;

import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.StudyCells;
import dev.bracket.stream.ingest.FollowUpPanes;

import java.time.Duration;
import java.util.Map;

/**
 * Units still without an outcome longer than the study's follow-up horizon after their exposure:
 * reported as lost to follow-up. Their outcomes stay bounded by the outcome range like any
 * pending outcome; the count only says which pending units are no longer expected.
 *
 * <p>Counted from the follow-up panes ({@link FollowUpPanes}): exposures by their time, outcomes
 * by their {@code exposed} time, in buckets of a quarter of the horizon. A bucket's
 * pending units are lost once the whole bucket is older than the horizon, so a unit is reported
 * lost between 1 and 1.25 horizons after its exposure. Outcome events without {@code exposed}
 * cannot be placed in a bucket; their units then look pending there, so the count is an upper
 * bound unless outcome events carry {@code exposed}.
 *
 * @param treated units of the treated arm lost to follow-up
 * @param control units of the control arm lost to follow-up
 * @param horizon the study's follow-up horizon
 */
public record LostToFollowUp(long treated, long control, Duration horizon) {

    /** The lost units at the given watermark, from the study's follow-up panes. */
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
