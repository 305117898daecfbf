package dev.bracket.alerts;

import dev.bracket.bands.AnytimeBand;
import dev.bracket.bands.ConfidenceBand;
import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.BoundCalculator;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeRange;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.time.Instant;
import java.util.List;

import static org.assertj.core.api.Assertions.assertThat;

/** The pending-share rule: counts of exposed units without an outcome against a configured limit. */
class PendingShareRuleTest {

    private static final OutcomeRange UNIT = new OutcomeRange(0, 1);
    private static final AssumptionSet WORST = AssumptionSet.parse("worst-case");

    private static BoundSnapshot snapshot(ObservedArms arms) {
        ConfidenceBand band = new AnytimeBand(0.95).ofCell(arms, UNIT, WORST);
        return new BoundSnapshot("registry", WORST, "cumulative", Instant.EPOCH, arms,
                BoundCalculator.interval(arms, UNIT, WORST), List.of(band));
    }

    private static ObservedArms arms(long treatedPending, long controlPending) {
        ArmStatistics t = ArmStatistics.of(1, 0, 1, 1, 0, 1, 0, 1, 1, 0); // 10 outcomes
        ArmStatistics c = ArmStatistics.of(0, 0, 1, 0, 1, 0, 0, 1, 0, 0);
        return new ObservedArms(t.withExposures(10 + treatedPending), c.withExposures(10 + controlPending));
    }

    @Test
    @DisplayName("fires above the limit in either arm, not at or below it, clears below the margin")
    void judgesTheLargerShare() {
        PendingShareRule rule = new PendingShareRule(0.25, 0.1);
        // 5 pending of 15 units = 1/3 > 0.25.
        BoundSnapshot high = snapshot(arms(0, 5));
        assertThat(rule.judge(high, high.bands().get(0)).outcome()).isEqualTo(Verdict.Outcome.MET);
        // 2 of 12 = 0.1667: within the limit, not below the clear margin (0.15).
        BoundSnapshot middle = snapshot(arms(2, 0));
        assertThat(rule.judge(middle, middle.bands().get(0)).outcome()).isEqualTo(Verdict.Outcome.UNMET);
        // Without exposures nothing is pending: 0 <= 0.15, cleared.
        BoundSnapshot none = snapshot(new ObservedArms(ArmStatistics.of(1, 0), ArmStatistics.of(0, 1)));
        assertThat(rule.judge(none, none.bands().get(0)).outcome()).isEqualTo(Verdict.Outcome.CLEAR);
    }
}
