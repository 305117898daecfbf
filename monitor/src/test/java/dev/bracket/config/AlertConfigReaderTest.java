package dev.bracket.config;

import dev.bracket.alerts.AlertsConfig;
import dev.bracket.alerts.AlertRule;
import dev.bracket.alerts.AssumptionsRefutedRule;
import dev.bracket.alerts.RowRule;
import dev.bracket.alerts.DataQualityRule;
import dev.bracket.alerts.IntervalNarrowRule;
import dev.bracket.alerts.PracticalEquivalenceRule;
import dev.bracket.alerts.SignIdentifiedRule;
import dev.bracket.alerts.StreamStalledRule;
import dev.bracket.alerts.StudyAlertConfig;
import dev.bracket.alerts.WebhookTarget;
import dev.bracket.bands.BandMethod;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.net.URI;
import java.time.Duration;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

@DisplayName("Alert settings in the YAML configuration")
class AlertConfigReaderTest {

    private static final String STUDY = """
            studies:
              - id: rollout
                outcome: {min: 0, max: 1}
            """;

    private static StudyAlertConfig alerts(String alertsYaml) {
        String text = STUDY + "    alerts:\n" + alertsYaml.indent(6);
        return BracketConfig.parse("a.yaml", text).studies().get(0).alerts();
    }

    @Test
    @DisplayName("the documented example reads into the rules, thresholds and webhooks it says")
    void fullExample() {
        BracketConfig c = BracketConfig.parse("a.yaml", STUDY + """
                    alerts:
                      band: fixed
                      min-per-arm: 50
                      clear-after: 4
                      rules:
                        sign-identified: {clear-zero-margin: 0.005}
                        interval-narrow: {width: 0.05}
                        practical-equivalence: {lower: -0.01, upper: 0.01}
                        assumptions-refuted:
                        stream-stalled: {after: 5m}
                        data-quality: {max-rejected-share: 0.05, period: 10m, min-events: 200}
                      webhooks:
                        - url: https://alerts.example.org/bracket
                          token-env: BRACKET_WEBHOOK_TOKEN
                          timeout: 3s
                          retry-for: 30m
                          queue: 500
                          backoff-initial: 250ms
                          backoff-max: PT1M
                alerts:
                  topic: rollout-alerts
                  check-interval: 2s
                  recent-transitions: 50
                  restore-timeout: 1m
                """);
        StudyAlertConfig a = c.studies().get(0).alerts();
        assertThat(a.band()).isEqualTo(BandMethod.FIXED_HORIZON);
        assertThat(a.minPerArm()).isEqualTo(50);
        assertThat(a.clearAfter()).isEqualTo(4);
        assertThat(a.rowRules()).containsExactly(new SignIdentifiedRule(0.005), new IntervalNarrowRule(0.05, 0),
                new PracticalEquivalenceRule(-0.01, 0.01, 0), new AssumptionsRefutedRule(0));
        assertThat(a.stalled()).contains(new StreamStalledRule(Duration.ofMinutes(5)));
        assertThat(a.quality()).contains(new DataQualityRule(0.05, Duration.ofMinutes(10), 200, 0));
        assertThat(a.webhooks()).containsExactly(new WebhookTarget(URI.create("https://alerts.example.org/bracket"),
                "BRACKET_WEBHOOK_TOKEN", Duration.ofSeconds(3), Duration.ofMinutes(30), 500, Duration.ofMillis(250),
                Duration.ofMinutes(1)));
        assertThat(c.alerts()).isEqualTo(new AlertsConfig("rollout-alerts", Duration.ofSeconds(2), 50, Duration.ofMinutes(1)));
    }

    @Test
    @DisplayName("without alert sections: sign-identified and assumptions-refuted on the anytime band, default options")
    void defaults() {
        BracketConfig c = BracketConfig.parse("a.yaml", STUDY);
        assertThat(c.studies().get(0).alerts()).isEqualTo(StudyAlertConfig.defaults());
        assertThat(c.studies().get(0).alerts().band()).isEqualTo(BandMethod.ANYTIME);
        assertThat(c.studies().get(0).alerts().rowRules()).extracting(RowRule::rule)
                .containsExactly(AlertRule.SIGN_IDENTIFIED, AlertRule.ASSUMPTIONS_REFUTED);
        assertThat(c.alerts()).isEqualTo(AlertsConfig.DEFAULTS);
        assertThat(c.alerts().topic()).isEqualTo("bracket-alerts");
        assertThat(alerts("rules: {}").rowRules()).as("an empty rules map turns per-row rules off").isEmpty();
    }

    @Test
    @DisplayName("mistakes are refused with file, line, column, the key's path and what to write")
    void errors() {
        assertThatThrownBy(() -> alerts("min-per-arms: 3"))
                .hasMessage("a.yaml:5:7: unknown key 'min-per-arms' in studies[0].alerts; allowed: band, clear-after,"
                        + " min-per-arm, rules, webhooks");
        assertThatThrownBy(() -> alerts("rules: {sign-identifed: {}}"))
                .hasMessageStartingWith("a.yaml:5:14: studies[0].alerts.rules names an unknown rule 'sign-identifed'; known: sign-identified");
        assertThatThrownBy(() -> alerts("rules: {interval-narrow: {}}"))
                .hasMessage("a.yaml:5:32: studies[0].alerts.rules.interval-narrow needs the key 'width'");
        assertThatThrownBy(() -> alerts("rules: {interval-narrow: {width: -1}}"))
                .hasMessageContaining("studies[0].alerts.rules.interval-narrow is not usable: interval-narrow width must be a finite number > 0");
        assertThatThrownBy(() -> alerts("rules: {stream-stalled: {after: soon}}"))
                .hasMessageContaining("studies[0].alerts.rules.stream-stalled.after must be a duration like 500ms, 30s");
        assertThatThrownBy(() -> alerts("band: bayesian"))
                .hasMessage("a.yaml:5:13: studies[0].alerts.band must be one of fixed, anytime, was 'bayesian'");
        assertThatThrownBy(() -> alerts("webhooks: [{url: 'ftp://x/y'}]"))
                .hasMessageContaining("studies[0].alerts.webhooks[0] is not usable: webhook url must be an http or https URL");
        assertThatThrownBy(() -> alerts("webhooks: [{url: 'http://x/y', token-env: 'my token'}]"))
                .hasMessageContaining("token-env must be an environment variable name");
        assertThatThrownBy(() -> alerts("min-per-arm: 0")).hasMessageContaining("studies[0].alerts.min-per-arm must be a whole number > 0");
        assertThatThrownBy(() -> alerts("rules: {data-quality: {max-rejected-share: 1.5}}"))
                .hasMessageContaining("max-rejected-share must lie in [0, 1)");
        assertThatThrownBy(() -> BracketConfig.parse("a.yaml", STUDY + "alerts: {topic: 'no spaces'}"))
                .hasMessageContaining("alerts is not usable: alerts topic must be 1-249 letters");
    }
}
