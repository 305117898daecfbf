package dev.bracket.alerts;

import dev.bracket.bands.BandMethod;
import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.config.BracketConfig;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.time.Clock;
import java.time.Instant;
import java.time.ZoneOffset;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Optional;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

/**
 * The excess-outcomes rule through the alert evaluator: outcomes beyond an arm's reported
 * exposures fire it; the missing exposures arriving resolve it. The counts are the check: an arm
 * of 12 outcomes with 10 exposures has 2 outcomes beyond them, 2/12 of its outcomes.
 */
class ExcessOutcomesRuleTest {

    /** Ten treated outcomes, all exposed; twelve control outcomes with {@code controlExposed} exposures. */
    private static ObservedArms arms(long controlExposed) {
        ArmStatistics treated = ArmStatistics.of(1, 0, 1, 1, 0, 1, 0, 1, 1, 0).withExposures(10);
        ArmStatistics control = ArmStatistics.of(0, 0, 1, 0, 1, 0, 0, 1, 0, 0, 1, 0).withExposures(controlExposed);
        return new ObservedArms(treated, control);
    }

    /** Evaluates one snapshot a minute per entry of {@code controlExposed} and collects the transitions. */
    private static List<AlertTransition> feed(ExcessOutcomesRule rule, int clearAfter, long... controlExposed) {
        AlertEvaluator evaluator = new AlertEvaluator(Map.of("registry", new StudyAlertConfig(5, BandMethod.ANYTIME,
                clearAfter, List.of(rule), Optional.empty(), Optional.empty(), List.of())), Clock.fixed(Snapshots.T0, ZoneOffset.UTC));
        List<AlertTransition> out = new ArrayList<>();
        Instant at = Snapshots.T0;
        for (long exposed : controlExposed) {
            out.addAll(evaluator.evaluate(Snapshots.of("registry", "worst-case", arms(exposed), -0.9, 0.9, at)));
            at = at.plusSeconds(60);
        }
        return out;
    }

    @Test
    @DisplayName("any excess fires by default; it resolves after clear-after looks once the exposures have arrived")
    void firesAndResolves() {
        List<AlertTransition> ts = feed(new ExcessOutcomesRule(0, 0), 2, 12, 10, 10, 12, 12, 12);
        assertThat(ts).extracting(AlertTransition::kind).containsExactly(TransitionKind.FIRING, TransitionKind.RESOLVED);
        // Fires on the second look (10 exposures for 12 outcomes), resolves on the fifth (second look with 12).
        assertThat(ts.get(0).at()).isEqualTo(Snapshots.T0.plusSeconds(60));
        assertThat(ts.get(0).key().toString()).isEqualTo("registry/worst-case/cumulative/excess-outcomes");
        assertThat(ts.get(0).summary()).contains("2 of 12 control (10 exposed)");
        assertThat(ts.get(1).at()).isEqualTo(Snapshots.T0.plusSeconds(4 * 60));
    }

    @Test
    @DisplayName("a share at or below max-share does not fire; the clear margin resolves at once")
    void limitAndMargin() {
        // 1 of 12 = 0.083 <= 0.1: no alert.
        assertThat(feed(new ExcessOutcomesRule(0.1, 0.05), 3, 11, 11, 11)).isEmpty();
        // 2 of 12 = 0.167 > 0.1 fires; 0 <= 0.1 - 0.05 resolves on the next look, without waiting 3 looks.
        List<AlertTransition> ts = feed(new ExcessOutcomesRule(0.1, 0.05), 3, 10, 12);
        assertThat(ts).extracting(AlertTransition::kind).containsExactly(TransitionKind.FIRING, TransitionKind.RESOLVED);
        assertThat(ts.get(1).at()).isEqualTo(Snapshots.T0.plusSeconds(60));
    }

    @Test
    @DisplayName("without exposure events there is no excess: never fires")
    void noExposures() {
        assertThat(feed(new ExcessOutcomesRule(0, 0), 1, 0, 0, 0)).isEmpty();
    }

    @Test
    @DisplayName("both rules on the arms' counts read from the configuration (excess max-share 0 by default); bad limits name the rule")
    void configured() {
        String yaml = """
                studies:
                  - id: registry
                    outcome: {min: 0, max: 1}
                    alerts:
                      rules:
                        pending-share: {max-share: 0.3}
                        excess-outcomes: {}
                """;
        assertThat(BracketConfig.parse("a.yaml", yaml).studies().get(0).alerts().rowRules())
                .containsExactly(new PendingShareRule(0.3, 0), new ExcessOutcomesRule(0, 0));
        assertThatThrownBy(() -> BracketConfig.parse("a.yaml", yaml.replace("0.3", "1.5")))
                .hasMessageContaining("pending-share max-share");
        assertThatThrownBy(() -> BracketConfig.parse("a.yaml", yaml.replace("{}", "{max-share: 0.1, clear-share-below: 0.2}")))
                .hasMessageContaining("excess-outcomes clear-share-below");
    }
}
