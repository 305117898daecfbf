package dev.bracket.config;

import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.OutcomeRange;

import java.util.List;

/**
 * One configured study: its identifier (the value of the events' study field), the declared
 * outcome range with the better direction, and the assumption sets to report.
 */
public record StudyConfig(String id, OutcomeRange range, List<AssumptionSet> assumptions) {

    public StudyConfig {
        assumptions = List.copyOf(assumptions);
    }
}
