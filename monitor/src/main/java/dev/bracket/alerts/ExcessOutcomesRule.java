package dev.bracket.alerts;

import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.ObservedArms;

import java.util.Locale;

/**
 * Fires when, in either arm, more outcomes arrived than units were reported exposed, beyond
 * {@code maxShare} of the arm's outcomes: a data-quality finding (exposure events lost, sent to
 * another topic, or naming the wrong arm). Such an arm counts its outcomes as its units, so its
 * bounds stay defined, but its pending count is then too low. Judged with every row of the
 * study's window; without exposure events there is no excess and it never fires.
 *
 * @param maxShare        the largest acceptable share of an arm's outcomes beyond its exposures, in [0, 1); 0: any
 * @param clearShareBelow a firing alert resolves at once when both shares fall to {@code maxShare - clearShareBelow}
 *                        or below; 0 disables the margin
 */
public record ExcessOutcomesRule(double maxShare, double clearShareBelow) implements ArmShareRule {

    public ExcessOutcomesRule {
        ArmShareRule.check(AlertRule.EXCESS_OUTCOMES, maxShare, clearShareBelow);
    }

    @Override
    public AlertRule rule() {
        return AlertRule.EXCESS_OUTCOMES;
    }

    /** Outcomes beyond the exposures as a share of the arm's outcomes. */
    @Override
    public double share(ArmStatistics arm) {
        return arm.count() == 0 ? 0 : (double) arm.excessOutcomes() / arm.count();
    }

    @Override
    public String seen(ObservedArms arms) {
        ArmStatistics treated = arms.treated();
        ArmStatistics control = arms.control();
        return String.format(Locale.ROOT, "outcomes beyond the reported exposures: %d of %d treated (%d exposed)"
                        + " and %d of %d control (%d exposed), limit %s of an arm's outcomes",
                treated.excessOutcomes(), treated.count(), treated.exposed(),
                control.excessOutcomes(), control.count(), control.exposed(), AlertText.num(maxShare));
    }
}
