package dev.bracket.web;

import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.AssumptionSet;
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

class HistoryCsvTest {

    @Test
    @DisplayName("one row per report and assumption set; a set with a comma is quoted; missing bands are empty cells")
    void rowsAndQuoting() {
        // Worst case (Manski 1990) with p = 0.5, mu1 = 0.7, mu0 = 0.5 in [0, 1]:
        // [0.5*0.7 + 0.5*0 - 0.5*0.5 - 0.5*1, 0.5*0.7 + 0.5*1 - 0.5*0.5 - 0.5*0] = [-0.4, 0.6].
        StudyCells cells = StudyCells.single(new ObservedArms(
                ArmStatistics.ofSummary(10, 0.7, 0.1), ArmStatistics.ofSummary(10, 0.5, 0.1)));
        StudyReport report = StudyReport.of(cells, new OutcomeRange(0, 1),
                List.of(AssumptionSet.parse("worst-case"), AssumptionSet.parse("mtr-positive,mts-positive")));
        ReportHistory history = new ReportHistory(10);
        history.record(new PublishedReport("s", "cumulative", Instant.parse("2026-01-01T00:00:01Z"), report));
        history.record(new PublishedReport("s", "cumulative", Instant.parse("2026-01-01T00:00:02Z"), report));

        List<String> lines = HistoryCsv.of(history, "s").orElseThrow().lines().toList();

        assertThat(lines).hasSize(5);
        assertThat(lines.get(0)).isEqualTo(HistoryCsv.HEADER);
        String[] first = lines.get(1).split(",", -1);
        assertThat(first[0]).isEqualTo("2026-01-01T00:00:01Z");
        assertThat(first[2]).isEqualTo("worst-case");
        assertThat(Double.parseDouble(first[4])).isCloseTo(-0.4, org.assertj.core.data.Offset.offset(1e-12));
        assertThat(Double.parseDouble(first[5])).isCloseTo(0.6, org.assertj.core.data.Offset.offset(1e-12));
        assertThat(List.of(first).subList(6, 12)).allMatch(String::isEmpty);
        assertThat(lines.get(3)).startsWith("2026-01-01T00:00:01Z,cumulative,\"mtr-positive,mts-positive\",bounded,");
        assertThat(HistoryCsv.of(history, "unknown")).isEmpty();
    }
}
