package dev.bracket.demo;

import java.time.Instant;

/** An endless feed of simulated events, keyed by unit so the units spread over partitions. */
public final class ScenarioFeed implements EventFeed {

    private final RolloutScenario scenario;
    private final String study;

    public ScenarioFeed(RolloutScenario scenario, String study) {
        this.scenario = scenario;
        this.study = study;
    }

    @Override
    public KeyedLine next(Instant now) {
        OutcomeEvent event = OutcomeEvent.observe(study, scenario.nextUnit(), now, scenario.settings().strata());
        return new KeyedLine(event.unit(), event.toJson());
    }
}
