package dev.bracket.alerts;

import dev.bracket.bounds.IdentifiedInterval;

import java.util.Map;

/**
 * A rule judged per study × assumption set × window from the estimated identified interval and
 * a confidence band. Implementations are pure functions of their settings and the two inputs.
 */
public sealed interface CellRule
        permits SignIdentifiedRule, IntervalNarrowRule, PracticalEquivalenceRule, AssumptionsRefutedRule {

    AlertRule rule();

    /** The verdict for one update; the interval is identified or refuted, never insufficient data. */
    Verdict judge(IdentifiedInterval interval, BandReading band);

    /** The configured limits by name, reported with every transition. */
    Map<String, Double> limits();
}
