package dev.bracket.config;

import dev.bracket.bounds.InstrumentAssumption;
import dev.bracket.bounds.OutcomeKind;
import org.junit.jupiter.api.Test;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

/** The study keys {@code outcome.kind} and {@code instrument}. */
class StudyInstrumentConfigTest {

    private static final String BASE = "studies:\n  - id: s\n    outcome: {min: 0, max: 1}\n";

    @Test
    void defaultsAreBoundedOutcomesAndAMeanIndependentInstrument() {
        StudyConfig s = BracketConfig.parse("c.yaml", BASE).studies().get(0);
        assertThat(s.range().kind()).isEqualTo(OutcomeKind.BOUNDED);
        assertThat(s.assumptions()).allMatch(set -> set.instrument() == InstrumentAssumption.MEAN_INDEPENDENT);
    }

    @Test
    void binaryOutcomeWithAnIndependentInstrumentReachesEveryAssumptionSet() {
        String yaml = "studies:\n  - id: s\n    outcome: {min: 0, max: 1, kind: binary}\n    instrument: independent\n"
                + "    assume: [[worst-case], [mtr-positive]]\n";
        StudyConfig s = BracketConfig.parse("c.yaml", yaml).studies().get(0);
        assertThat(s.range().kind()).isEqualTo(OutcomeKind.BINARY);
        assertThat(s.assumptions()).hasSize(2).allMatch(set -> set.instrument() == InstrumentAssumption.INDEPENDENT);
    }

    @Test
    void brokenValuesAreReportedWithTheirPlace() {
        assertError(BASE + "    instrument: independent\n",
                "c.yaml:4:17: studies[0].instrument independent needs a binary outcome: add kind: binary");
        assertError(BASE + "    instrument: strong\n", "c.yaml:4:17: studies[0].instrument must be 'mean-independent' or 'independent'");
        assertError(BASE.replace("max: 1}", "max: 1, kind: count}"), "c.yaml:3:37: studies[0].outcome.kind must be 'bounded' or 'binary'");
    }

    private static void assertError(String yaml, String expectedStart) {
        assertThatThrownBy(() -> BracketConfig.parse("c.yaml", yaml)).isInstanceOf(ConfigError.class).hasMessageStartingWith(expectedStart);
    }
}
