package dev.bracket.alerts;

import dev.bracket.bands.ConfidenceBand;
import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.IdentifiedInterval;
import dev.bracket.bounds.ObservedArms;

import java.util.LinkedHashMap;
import java.util.Map;

/**
 * A per-row rule on a share measured in each arm from its counts (pending units, outcomes beyond
 * the exposures): fires when the larger arm's share exceeds {@code maxShare}, resolves at once
 * when both shares fall {@code clearShareBelow} below it (0 disables that margin).
 */
public sealed interface ArmShareRule extends RowRule permits PendingShareRule, ExcessOutcomesRule {

    /** The largest acceptable share, in [0, 1). */
    double maxShare();

    /** The clear margin below {@link #maxShare()}, in [0, maxShare]. */
    double clearShareBelow();

    /** The arm's share this rule limits; 0 for an arm without units. */
    double share(ArmStatistics arm);

    /** What was measured, in words, for the alert's summary. */
    String seen(ObservedArms arms);

    /** Refuses limits outside [0, 1) and margins outside [0, maxShare], naming the rule. */
    static void check(AlertRule rule, double maxShare, double clearShareBelow) {
        if (!(maxShare >= 0 && maxShare < 1)) {
            throw new IllegalArgumentException(rule.id() + " max-share must lie in [0, 1), was " + maxShare);
        }
        if (!(clearShareBelow >= 0 && clearShareBelow <= maxShare)) {
            throw new IllegalArgumentException(rule.id() + " clear-share-below must lie in [0, max-share], was " + clearShareBelow);
        }
    }

    /** The interval and band alone do not show the arms' counts. */
    @Override
    default Verdict judge(IdentifiedInterval interval, ConfidenceBand band) {
        return Verdict.unknown(rule().id() + " needs the arms' counts");
    }

    @Override
    default Verdict judge(BoundSnapshot snapshot, ConfidenceBand band) {
        double worst = Math.max(share(snapshot.arms().treated()), share(snapshot.arms().control()));
        String seen = seen(snapshot.arms());
        if (worst > maxShare()) {
            return Verdict.met("", seen);
        }
        if (clearShareBelow() > 0 && worst <= maxShare() - clearShareBelow()) {
            return Verdict.clear(seen + ", below the limit by the clear margin " + AlertText.num(clearShareBelow()));
        }
        return Verdict.unmet(seen);
    }

    @Override
    default Map<String, Double> limits() {
        Map<String, Double> m = new LinkedHashMap<>();
        m.put("maxShare", maxShare());
        m.put("clearShareBelow", clearShareBelow());
        return m;
    }
}
