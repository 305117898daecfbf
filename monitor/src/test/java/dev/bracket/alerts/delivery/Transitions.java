package dev.bracket.alerts.delivery;

import dev.bracket.alerts.AlertKey;
import dev.bracket.alerts.AlertRule;
import dev.bracket.alerts.AlertState;
import dev.bracket.alerts.AlertTransition;
import dev.bracket.alerts.Evidence;
import dev.bracket.alerts.Snapshots;
import dev.bracket.alerts.Verdict;
import dev.bracket.bands.BandMethod;
import dev.bracket.bounds.IdentifiedInterval;

import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;

/** Real transitions from the state machine, for sink tests. */
public final class Transitions {

    static final Evidence EVIDENCE = new Evidence.OfBand(Snapshots.arms(100, 0.6, 100, 0.4),
            IdentifiedInterval.of(0.2, 0.6), Snapshots.band(BandMethod.ANYTIME, 0.05, 0.7),
            Map.of("clearZeroMargin", 0.0));

    private Transitions() {
    }

    public static AlertKey key(String study, String assumptions) {
        return new AlertKey(study, assumptions, "cumulative", AlertRule.SIGN_IDENTIFIED);
    }

    /** {@code count} alternating firing/resolved transitions of one key, one minute apart. */
    public static List<AlertTransition> alternating(AlertKey key, int count) {
        List<AlertTransition> out = new ArrayList<>();
        AlertState s = AlertState.initial(key);
        Instant at = Snapshots.T0;
        for (int i = 0; i < count; i++) {
            Verdict v = s.firing() ? Verdict.clear("band contains 0") : Verdict.met("positive", "band lies above 0");
            AlertState.Step step = s.next(v, EVIDENCE, at, 1, "meaning of " + key.assumptions());
            s = step.state();
            out.addAll(step.transitions());
            at = at.plusSeconds(60);
        }
        return out;
    }
}
