package dev.bracket.report.render;

import dev.bracket.bands.BandConfig;
import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.StudyCells;
import dev.bracket.config.StudyConfig;
import dev.bracket.config.WindowSpec;
import dev.bracket.report.LostToFollowUp;
import dev.bracket.report.StudyReport;
import dev.bracket.stream.publish.ReportDocument;
import dev.bracket.stream.publish.WindowReport;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.io.IOException;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;

import static org.assertj.core.api.Assertions.assertThat;

/**
 * Documents written by the streaming generator equal, byte for byte, those built as trees by the
 * code before it ({@link TreeBuiltDocument}, frozen), on random reports.
 */
class StreamedDocumentTest {

    private static final WindowSpec HOURLY = new WindowSpec("hourly", WindowSpec.Kind.TUMBLING, Duration.ofHours(1), Duration.ofHours(1));
    private static final WindowSpec DAY = new WindowSpec("last-day", WindowSpec.Kind.SLIDING, Duration.ofHours(24), Duration.ofHours(1));

    @Test
    @DisplayName("the bound document and the report body are the same bytes as when built as trees")
    void sameBytesAsTrees() throws IOException {
        SplittableRandom rng = new SplittableRandom(4);
        List<StudyCells> studies = new ArrayList<>();
        for (int i = 0; i < ReferenceReports.STUDIES; i++) {
            studies.add(ReferenceReports.study(i));
        }
        // Nulls: an arm with no units (no mean), one with a single unit (no sd), and no units at all.
        ArmStatistics one = new ArmStatistics(1, 0.5, 0, -5, 5);
        ArmStatistics some = new ArmStatistics(40, -1.25, 30, -5, 5);
        studies.add(StudyCells.single(new ObservedArms(some, ArmStatistics.empty())));
        studies.add(StudyCells.single(new ObservedArms(one, some)));
        studies.add(StudyCells.empty());
        // Pending outcomes: exposures beyond the outcomes in both arms, and more outcomes than exposures in one.
        studies.add(StudyCells.single(new ObservedArms(some.withExposures(55), one.withExposures(3))));
        studies.add(StudyCells.single(new ObservedArms(some.withExposures(12), ArmStatistics.empty().withExposures(4))));
        List<AssumptionSet> sets = new ArrayList<>(ReferenceReports.sets());
        sets.add(AssumptionSet.parse("missing-at-random"));
        sets.add(AssumptionSet.parse("missing-at-random,mtr-positive"));
        StudyConfig study = new StudyConfig("study \"q\"/ü", ReferenceReports.RANGE, sets);
        for (StudyCells cells : studies) {
            StudyReport report = StudyReport.of(cells, ReferenceReports.RANGE, sets, BandConfig.both(0.95));
            WindowSpec window = List.of(WindowSpec.CUMULATIVE, HOURLY, DAY).get(rng.nextInt(3));
            long end = 1_735_689_600_000L + 3_600_000L * rng.nextInt(1000);
            LostToFollowUp lost = window.kind() == WindowSpec.Kind.CUMULATIVE && rng.nextBoolean()
                    ? new LostToFollowUp(rng.nextInt(5), rng.nextInt(5), Duration.ofDays(1 + rng.nextInt(60))) : null;
            WindowReport r = new WindowReport(study, window, end - window.size().toMillis(), end, report,
                    rng.nextInt(3) * rng.nextLong(1_000_000), lost);
            long revision = 1 + rng.nextLong(1L << 40);
            Instant at = rng.nextBoolean() ? null : Instant.ofEpochMilli(end + rng.nextInt(5_000_000));
            byte[] tree = ReportJson.mapper().writeValueAsBytes(TreeBuiltDocument.document(r, revision, at));
            assertThat(new String(ReportDocument.bytes(r, revision, at), "UTF-8")).isEqualTo(new String(tree, "UTF-8"));
            assertThat(ReportJson.mapper().writeValueAsBytes(ReportDocument.toJson(r, revision, at))).isEqualTo(tree);
            assertThat(ReportJson.mapper().writeValueAsString(ReportJson.toJson(report)))
                    .isEqualTo(ReportJson.mapper().writeValueAsString(TreeBuiltDocument.report(report)));
        }
    }
}
