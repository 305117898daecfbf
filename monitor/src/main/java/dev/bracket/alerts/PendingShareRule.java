package dev.bracket.alerts;

import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.ObservedArms;

import java.util.Locale;

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
public record PendingShareRule(double maxShare, double clearShareBelow) implements ArmShareRule {

    public PendingShareRule {
        ArmShareRule.check(AlertRule.PENDING_SHARE, maxShare, clearShareBelow);
    }

    @Override
    public AlertRule rule() {
        return AlertRule.PENDING_SHARE;
    }

    @Override
    public double share(ArmStatistics arm) {
        return arm.units() == 0 ? 0 : (double) arm.pending() / arm.units();
    }

    @Override
    public String seen(ObservedArms arms) {
        return String.format(Locale.ROOT, "outcomes pending for %d of %d treated and %d of %d control units"
                        + " (shares %s and %s), limit %s",
                arms.treated().pending(), arms.treated().units(), arms.control().pending(), arms.control().units(),
                AlertText.num(share(arms.treated())), AlertText.num(share(arms.control())), AlertText.num(maxShare));
    }
}
