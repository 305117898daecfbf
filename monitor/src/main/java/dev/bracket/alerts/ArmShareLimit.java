package dev.bracket.alerts;

import java.util.LinkedHashMap;
import java.util.Map;

/**
 * The limit on a share measured in each arm, as the pending-share and excess-outcomes rules
 * hold it: fires when the larger arm's share exceeds {@code maxShare}, resolves at once when both
 * shares fall {@code clearShareBelow} below it (0 disables that margin).
 */
final class ArmShareLimit {

    private ArmShareLimit() {
    }

    /** Refuses limits outside [0, 1) and margins outside [0, maxShare], naming the rule. */
    static void check(AlertRule rule, double maxShare, double clearShareBelow) {
        if (!(maxShare >= 0 && maxShare < 1)) {
            throw new IllegalArgumentException(rule.id() + " max-share must lie in [0, 1), was " + maxShare);
        }
        if (!(clearShareBelow >= 0 && clearShareBelow <= maxShare)) {
            throw new IllegalArgumentException(rule.id() + " clear-share-below must lie in [0, max-share], was " + clearShareBelow);
        }
    }

    /** The verdict for the larger of the two arms' shares; {@code seen} says what was measured. */
    static Verdict judge(double treated, double control, double maxShare, double clearShareBelow, String seen) {
        double worst = Math.max(treated, control);
        if (worst > maxShare) {
            return Verdict.met("", seen);
        }
        if (clearShareBelow > 0 && worst <= maxShare - clearShareBelow) {
            return Verdict.clear(seen + ", below the limit by the clear margin " + AlertText.num(clearShareBelow));
        }
        return Verdict.unmet(seen);
    }

    static Map<String, Double> limits(double maxShare, double clearShareBelow) {
        Map<String, Double> m = new LinkedHashMap<>();
        m.put("maxShare", maxShare);
        m.put("clearShareBelow", clearShareBelow);
        return m;
    }
}
