package dev.bracket.alerts;

import dev.bracket.bands.ConfidenceBand;
import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.IdentifiedInterval;

import java.util.Locale;
import java.util.Map;

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
public record ExcessOutcomesRule(double maxShare, double clearShareBelow) implements RowRule {

    public ExcessOutcomesRule {
        ArmShareLimit.check(AlertRule.EXCESS_OUTCOMES, maxShare, clearShareBelow);
    }

    @Override
    public AlertRule rule() {
        return AlertRule.EXCESS_OUTCOMES;
    }

    /** The interval and band alone do not show the arms' counts. */
    @Override
    public Verdict judge(IdentifiedInterval interval, ConfidenceBand band) {
        return Verdict.unknown("excess outcomes need the arms' counts");
    }

    @Override
    public Verdict judge(BoundSnapshot snapshot, ConfidenceBand band) {
        ArmStatistics treated = snapshot.arms().treated();
        ArmStatistics control = snapshot.arms().control();
        String seen = String.format(Locale.ROOT, "outcomes beyond the reported exposures: %d of %d treated (%d exposed)"
                        + " and %d of %d control (%d exposed), limit %s of an arm's outcomes",
                treated.excessOutcomes(), treated.count(), treated.exposed(),
                control.excessOutcomes(), control.count(), control.exposed(), AlertText.num(maxShare));
        return ArmShareLimit.judge(share(treated), share(control), maxShare, clearShareBelow, seen);
    }

    private static double share(ArmStatistics arm) {
        return arm.count() == 0 ? 0 : (double) arm.excessOutcomes() / arm.count();
    }

    @Override
    public Map<String, Double> limits() {
        return ArmShareLimit.limits(maxShare, clearShareBelow);
    }
}
