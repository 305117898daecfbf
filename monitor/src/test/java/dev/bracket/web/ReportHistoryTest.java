package dev.bracket.web;

import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.BoundStatus;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.bounds.StudyCells;
import dev.bracket.report.store.PublishedReport;
import dev.bracket.report.StudyReport;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.time.Instant;
import java.util.List;

import static org.assertj.core.api.Assertions.assertThat;

class ReportHistoryTest {

    private static PublishedReport at(long second, long treated, long control) {
        StudyCells cells = StudyCells.single(new ObservedArms(
                ArmStatistics.ofSummary(treated, 0.7, 0.1), ArmStatistics.ofSummary(control, 0.5, 0.1)));
        StudyReport report = StudyReport.of(cells, new OutcomeRange(0, 1), List.of(AssumptionSet.parse("worst-case")));
        return new PublishedReport("s", "cumulative", Instant.ofEpochSecond(second), report);
    }

    @Test
    @DisplayName("a series keeps only its newest points, oldest first")
    void boundedToCapacity() {
        ReportHistory history = new ReportHistory(3);
        for (long s = 1; s <= 5; s++) {
            history.record(at(s, 10 * s, 10));
        }
        List<ReportHistory.Point> points = history.study("s").get(0).points();
        assertThat(points).extracting(ReportHistory.Point::epochMillis).containsExactly(3000L, 4000L, 5000L);
    }

    @Test
    @DisplayName("a report that is not newer than the last recorded one adds nothing")
    void repeatedReportsAreIgnored() {
        ReportHistory history = new ReportHistory(10);
        assertThat(history.record(at(5, 10, 10))).isTrue();
        assertThat(history.record(at(5, 10, 10))).isFalse();
        assertThat(history.record(at(4, 10, 10))).isFalse();
        assertThat(history.study("s").get(0).points()).hasSize(1);
    }

    @Test
    @DisplayName("an interval that cannot be computed is kept as a gap with its status")
    void insufficientDataIsAGap() {
        ReportHistory history = new ReportHistory(10);
        history.record(at(1, 0, 10));
        ReportHistory.Point p = history.study("s").get(0).points().get(0);
        assertThat(p.status()).isEqualTo(BoundStatus.INSUFFICIENT_DATA);
        assertThat(p.lower()).isNaN();
    }
}
