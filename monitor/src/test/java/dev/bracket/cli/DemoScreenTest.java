package dev.bracket.cli;

import dev.bracket.bands.BandMethod;
import dev.bracket.bands.BandConfig;
import dev.bracket.bands.ConfidenceBand;
import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.bounds.StudyCells;
import dev.bracket.demo.TrueEffects;
import dev.bracket.report.store.PublishedReport;
import dev.bracket.report.StudyReport;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.time.Duration;
import java.time.Instant;
import java.util.List;
import java.util.Optional;

import dev.bracket.alerts.AlertKey;
import dev.bracket.alerts.AlertRule;
import dev.bracket.alerts.AlertState;

import static org.assertj.core.api.Assertions.assertThat;

class DemoScreenTest {

    private static final TrueEffects TRUTH = new TrueEffects(-0.02, 0.4, 0.62, 0.48, 0.5, 0.7);

    private static DemoScreen.State state(Optional<PublishedReport> report) {
        return state(report, List.of());
    }

    private static DemoScreen.State state(Optional<PublishedReport> report, List<AlertState> firing) {
        return new DemoScreen.State("host-rollout", "An invented rollout.", TRUTH, 1234, Duration.ofSeconds(12),
                Duration.ofSeconds(60), "http://127.0.0.1:8080/", report, firing);
    }

    @Test
    @DisplayName("each interval is shown with its width and sign, and whether the true ATE lies inside it")
    void intervalsBesideTheTruth() {
        StudyCells cells = StudyCells.single(new ObservedArms(
                ArmStatistics.ofSummary(400, 0.62, 0.2), ArmStatistics.ofSummary(600, 0.48, 0.2)));
        StudyReport report = StudyReport.of(cells, new OutcomeRange(0, 1),
                List.of(AssumptionSet.parse("worst-case"), AssumptionSet.parse("mtr-positive,mts-positive")),
                BandConfig.both(0.95));
        ConfidenceBand anytime = report.rows().get(0).bands().stream()
                .filter(b -> b.method() == BandMethod.ANYTIME).findFirst().orElseThrow();
        String screen = DemoScreen.render(state(Optional.of(new PublishedReport("host-rollout", "cumulative",
                Instant.parse("2026-01-01T10:00:00Z"), report))));

        // Manski (1990) worst case for p = 0.4, mu1 = 0.62, mu0 = 0.48 on [0, 1]: [-0.44, 0.56], width 1.
        assertThat(line(screen, "worst-case ")).contains("-0.4400", "+0.5600", "1.0000", "not identified (contains 0)", "yes");
        // MTR+ with MTS+: [0, mu1 - mu0] = [0, 0.14] (Manski & Pepper 2000), which misses an ATE of -0.02.
        assertThat(line(screen, "mtr-positive,mts-positive")).contains("+0.0000", "+0.1400", "NO");
        assertThat(screen).contains("95% anytime band");
        assertThat(line(screen, "worst-case ")).contains(String.format(java.util.Locale.ROOT, "[%+.4f, %+.4f]", anytime.lower(), anytime.upper()));
        assertThat(screen).contains("True ATE -0.0200", "1,234", "1,000 units", "400 with the setting", "600 without",
                "Naive difference of means +0.1400", "12 s of 60 s", "http://127.0.0.1:8080/",
                "only as credible as its assumptions", "not clinical");
    }

    @Test
    @DisplayName("firing alerts are listed under the table with their rule, side, assumptions and time; none says so")
    void firingAlertsAreShown() {
        StudyCells cells = StudyCells.single(new ObservedArms(
                ArmStatistics.ofSummary(400, 0.62, 0.2), ArmStatistics.ofSummary(600, 0.48, 0.2)));
        StudyReport report = StudyReport.of(cells, new OutcomeRange(0, 1), List.of(AssumptionSet.parse("mts-negative")));
        Optional<PublishedReport> published = Optional.of(new PublishedReport("host-rollout", "cumulative",
                Instant.parse("2026-01-01T10:00:00Z"), report));
        Instant since = Instant.parse("2026-01-01T09:59:30Z");
        AlertState firing = new AlertState(new AlertKey("host-rollout", "mts-negative", "cumulative", AlertRule.SIGN_IDENTIFIED),
                true, "positive", 1, since, since, 0);

        assertThat(DemoScreen.render(state(published))).contains("Alerts: none firing.");
        assertThat(line(DemoScreen.render(state(published, List.of(firing))), "  since 09:59:30 UTC"))
                .contains("sign-identified", "positive", "mts-negative");
    }

    @Test
    @DisplayName("without bands in the reports there is no band column")
    void noBandColumnWithoutBands() {
        StudyCells cells = StudyCells.single(new ObservedArms(
                ArmStatistics.ofSummary(400, 0.62, 0.2), ArmStatistics.ofSummary(600, 0.48, 0.2)));
        StudyReport report = StudyReport.of(cells, new OutcomeRange(0, 1), List.of(AssumptionSet.parse("worst-case")));
        String screen = DemoScreen.render(state(Optional.of(new PublishedReport("host-rollout", "cumulative",
                Instant.parse("2026-01-01T10:00:00Z"), report))));
        assertThat(screen).doesNotContain("band");
        assertThat(line(screen, "worst-case ")).matches("worst-case +-0\\.4400 +\\+0\\.5600 +1\\.0000 +not identified \\(contains 0\\) +yes");
    }

    @Test
    @DisplayName("before the first report the screen says it is waiting, with the cautions")
    void waitingScreen() {
        String screen = DemoScreen.render(state(Optional.empty()));
        assertThat(screen).contains("Waiting for the first report", "1,234", "only as credible as its assumptions");
    }

    @Test
    @DisplayName("long paragraphs are wrapped at spaces within the width")
    void wrapsText() {
        String wrapped = DemoScreen.wrap("aaaa bbbb cccc dddd eeee", 10);
        assertThat(wrapped.split("\n")).containsExactly("aaaa bbbb", "cccc dddd", "eeee");
    }

    private static String line(String screen, String start) {
        return screen.lines().filter(l -> l.startsWith(start)).findFirst().orElseThrow(() -> new AssertionError("no line " + start + " in\n" + screen));
    }
}
