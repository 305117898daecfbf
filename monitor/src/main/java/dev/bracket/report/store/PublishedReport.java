package dev.bracket.report.store;

import dev.bracket.report.LostToFollowUp;
import dev.bracket.report.StudyReport;

import java.time.Instant;

/**
 * The latest computed report of one study in one window, as the bound updater publishes it and
 * the HTTP API serves it.
 *
 * @param study       the study identifier from the configuration
 * @param window      the window name ({@code cumulative} or a window's label)
 * @param windowStart where the window's current pane begins; null for {@code cumulative}
 * @param windowEnd   where it ends; null for {@code cumulative}
 * @param computedAt  when the updater computed it
 * @param report      the bounds, built from all partitions' merged statistics
 * @param lost        units lost to follow-up: the cumulative window of a study with a follow-up horizon; else null
 */
public record PublishedReport(String study, String window, Instant windowStart, Instant windowEnd, Instant computedAt,
                              StudyReport report, LostToFollowUp lost) {

    /** A report of the cumulative window, which has no start or end, of a study without a follow-up horizon. */
    public PublishedReport(String study, String window, Instant computedAt, StudyReport report) {
        this(study, window, null, null, computedAt, report, null);
    }
}
