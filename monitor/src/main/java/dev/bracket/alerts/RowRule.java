package dev.bracket.alerts;

import dev.bracket.bands.ConfidenceBand;
import dev.bracket.bounds.IdentifiedInterval;

import java.util.Map;

/**
 * A rule judged per study × assumption set × window from the estimated identified interval and
 * a confidence band. Implementations are pure functions of their settings and the two inputs.
 */
public sealed interface RowRule
        permits SignIdentifiedRule, IntervalNarrowRule, PracticalEquivalenceRule, AssumptionsRefutedRule, ArmShareRule {

    AlertRule rule();

    /**
     * The verdict for one update. Neither the interval nor the band lacks data (the evaluator
     * judges nothing then); each is identified or refuted.
     */
    Verdict judge(IdentifiedInterval interval, ConfidenceBand band);

    /** The verdict from the whole snapshot; rules that need only the interval and band use {@link #judge(IdentifiedInterval, ConfidenceBand)}. */
    default Verdict judge(BoundSnapshot snapshot, ConfidenceBand band) {
        return judge(snapshot.interval(), band);
    }

    /** The configured limits by name, reported with every transition. */
    Map<String, Double> limits();
}
