package dev.bracket.alerts;

import dev.bracket.bands.ConfidenceBand;
import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.IdentifiedInterval;

import java.util.Locale;
import java.util.Map;

/**
 * Fires when, in either arm, the share of units whose outcome has not arrived (exposed, no
 * outcome yet) exceeds {@code maxShare}. Judged with every row of the study's window: a row with
 * {@code missing-at-random} then leans on that assumption for that many units, and a row without
 * it is wide because of them. Without exposure events nothing is pending and it never fires.
 *
 * @param maxShare    the largest acceptable pending share, in [0, 1)
 * @param clearShareBelow a firing alert resolves at once when both shares fall to {@code maxShare - clearShareBelow}
 *                    or below; 0 disables the margin
 */
public record PendingShareRule(double maxShare, double clearShareBelow) implements RowRule {

    public PendingShareRule {
        ArmShareLimit.check(AlertRule.PENDING_SHARE, maxShare, clearShareBelow);
    }

    @Override
    public AlertRule rule() {
        return AlertRule.PENDING_SHARE;
    }

    /** The interval and band alone do not show pending units. */
    @Override
    public Verdict judge(IdentifiedInterval interval, ConfidenceBand band) {
        return Verdict.unknown("the pending share needs the arms' counts");
    }

    @Override
    public Verdict judge(BoundSnapshot snapshot, ConfidenceBand band) {
        double treated = share(snapshot.arms().treated());
        double control = share(snapshot.arms().control());
        String seen = String.format(Locale.ROOT, "outcomes pending for %d of %d treated and %d of %d control units"
                        + " (shares %s and %s), limit %s",
                snapshot.arms().treated().pending(), snapshot.arms().treated().units(),
                snapshot.arms().control().pending(), snapshot.arms().control().units(),
                AlertText.num(treated), AlertText.num(control), AlertText.num(maxShare));
        return ArmShareLimit.judge(treated, control, maxShare, clearShareBelow, seen);
    }

    private static double share(ArmStatistics arm) {
        return arm.units() == 0 ? 0 : (double) arm.pending() / arm.units();
    }

    @Override
    public Map<String, Double> limits() {
        return ArmShareLimit.limits(maxShare, clearShareBelow);
    }
}
