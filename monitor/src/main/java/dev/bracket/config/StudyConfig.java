package dev.bracket.config;

import dev.bracket.alerts.StudyAlertConfig;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.OutcomeRange;

import java.time.Duration;
import java.util.List;

/**
 * One configured study: its identifier (the value of the events' study field), the declared
 * outcome range with the better direction, the assumption sets to report, its alert settings and
 * its follow-up horizon (null: none), after which a unit still without an outcome is lost to follow-up.
 */
public record StudyConfig(String id, OutcomeRange range, List<AssumptionSet> assumptions, StudyAlertConfig alerts,
                          Duration followUp) {

    public StudyConfig {
        assumptions = List.copyOf(assumptions);
        if (alerts == null) {
            throw new IllegalArgumentException("study alerts settings are required (StudyAlertConfig.defaults() for none given)");
        }
    }

    /** A study without a follow-up horizon. */
    public StudyConfig(String id, OutcomeRange range, List<AssumptionSet> assumptions, StudyAlertConfig alerts) {
        this(id, range, assumptions, alerts, null);
    }

    /** A study with the default alert settings. */
    public StudyConfig(String id, OutcomeRange range, List<AssumptionSet> assumptions) {
        this(id, range, assumptions, StudyAlertConfig.defaults());
    }
}
