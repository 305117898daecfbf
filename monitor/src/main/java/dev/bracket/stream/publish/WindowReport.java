package dev.bracket.stream.publish;

import dev.bracket.bands.BandConfig;
import dev.bracket.config.StudyConfig;
import dev.bracket.config.WindowSpec;
import dev.bracket.report.LostToFollowUp;
import dev.bracket.report.StudyReport;

/**
 * A study's bounds in one window, computed from merged partial statistics, with confidence bands.
 *
 * @param start      first event time in the window (inclusive, epoch millis); {@link Long#MIN_VALUE} for cumulative
 * @param end        end of the window (exclusive); {@link Long#MAX_VALUE} for cumulative
 * @param lateEvents events that arrived after the window had closed (grace included) and were left out
 * @param lost       units lost to follow-up, for the cumulative window of a study with a follow-up horizon; else null
 */
public record WindowReport(StudyConfig study, WindowSpec window, long start, long end, StudyReport report, long lateEvents,
                           LostToFollowUp lost) {

    /**
     * The study's report for the window that holds the current watermark: the whole stream for
     * cumulative, the watermark's pane for tumbling, and the last {@code size / step} panes
     * ending with the watermark's pane for sliding.
     */
    public static WindowReport current(StudyConfig study, WindowSpec window, MergedPartials partials, BandConfig bands) {
        long end = Long.MAX_VALUE;
        if (window.kind() != WindowSpec.Kind.CUMULATIVE) {
            end = end(window, partials.watermark());
        }
        return ending(study, window, end, partials, bands);
    }

    /**
     * The study's report for the window that ends at {@code end} (exclusive; a pane boundary):
     * its pane for tumbling, the last {@code size / step} panes for sliding. {@code end} is
     * ignored for cumulative.
     */
    public static WindowReport ending(StudyConfig study, WindowSpec window, long end, MergedPartials partials, BandConfig bands) {
        boolean cumulative = window.kind() == WindowSpec.Kind.CUMULATIVE;
        long to = cumulative ? Long.MAX_VALUE : end;
        long from = cumulative ? Long.MIN_VALUE : end - window.size().toMillis();
        StudyReport report = StudyReport.of(partials.cells(study.id(), window.name(), pane -> pane >= from && pane < to),
                study.range(), study.assumptions(), bands);
        LostToFollowUp lost = study.followUp() != null && cumulative ? FollowUpCount.at(study.id(), study.followUp(), partials) : null;
        return new WindowReport(study, window, from, to, report, partials.late(study.id(), window.name()), lost);
    }

    /** End (exclusive) of a time window's span at {@code watermark}: the end of the watermark's pane; 0 before any event. */
    static long end(WindowSpec window, long watermark) {
        return watermark == Long.MIN_VALUE ? 0 : window.paneStart(watermark) + window.paneMillis();
    }
}
