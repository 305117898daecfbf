package dev.bracket.alerts;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.dataformat.yaml.YAMLFactory;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.net.URI;
import java.time.Duration;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

@DisplayName("Alert settings from YAML")
class AlertConfigReaderTest {

    private static final ObjectMapper YAML = new ObjectMapper(new YAMLFactory());

    private static StudyAlertConfig read(String yaml) throws Exception {
        return AlertConfigReader.read(YAML.readTree(yaml).get("alerts"), "studies[0].alerts");
    }

    @Test
    @DisplayName("the documented example reads into the rules, thresholds and webhooks it says")
    void fullExample() throws Exception {
        StudyAlertConfig c = read("""
                alerts:
                  band: fixed-horizon
                  min-per-arm: 50
                  clear-after: 4
                  rules:
                    sign-identified: {clear-margin: 0.005}
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
                """);
        assertThat(c.band()).isEqualTo(BandMethod.FIXED_HORIZON);
        assertThat(c.minPerArm()).isEqualTo(50);
        assertThat(c.clearAfter()).isEqualTo(4);
        assertThat(c.cellRules()).containsExactly(new SignIdentifiedRule(0.005), new IntervalNarrowRule(0.05, 0),
                new PracticalEquivalenceRule(-0.01, 0.01, 0), new AssumptionsRefutedRule(0));
        assertThat(c.stalled()).contains(new StreamStalledRule(Duration.ofMinutes(5)));
        assertThat(c.quality()).contains(new DataQualityRule(0.05, Duration.ofMinutes(10), 200, 0));
        assertThat(c.webhooks()).containsExactly(new WebhookTarget(URI.create("https://alerts.example.org/bracket"),
                "BRACKET_WEBHOOK_TOKEN", Duration.ofSeconds(3), Duration.ofMinutes(30), 500, Duration.ofMillis(250),
                Duration.ofMinutes(1)));
    }

    @Test
    @DisplayName("no alerts section: sign-identified and assumptions-refuted on the anytime-valid band")
    void defaults() throws Exception {
        StudyAlertConfig c = read("other: 1");
        assertThat(c).isEqualTo(StudyAlertConfig.defaults());
        assertThat(c.band()).isEqualTo(BandMethod.ANYTIME_VALID);
        assertThat(c.cellRules()).extracting(CellRule::rule)
                .containsExactly(AlertRule.SIGN_IDENTIFIED, AlertRule.ASSUMPTIONS_REFUTED);
        assertThat(read("alerts: {rules: {}}").cellRules()).as("an empty rules map turns per-cell rules off").isEmpty();
    }

    @Test
    @DisplayName("mistakes are refused with the key's path and what to write instead")
    void errors() {
        assertThatThrownBy(() -> read("alerts: {min-per-arms: 3}"))
                .hasMessage("studies[0].alerts.min-per-arms: unknown key; known here: band, clear-after, min-per-arm, rules, webhooks");
        assertThatThrownBy(() -> read("alerts: {rules: {sign-identifed: {}}}"))
                .hasMessageStartingWith("studies[0].alerts.rules.sign-identifed: unknown alert rule 'sign-identifed'; known: sign-identified");
        assertThatThrownBy(() -> read("alerts: {rules: {interval-narrow: {}}}"))
                .hasMessage("studies[0].alerts.rules.interval-narrow.width: missing; this rule needs it");
        assertThatThrownBy(() -> read("alerts: {rules: {interval-narrow: {width: -1}}}"))
                .hasMessageContaining("interval-narrow width must be a finite number > 0");
        assertThatThrownBy(() -> read("alerts: {rules: {stream-stalled: {after: soon}}}"))
                .hasMessageContaining("studies[0].alerts.rules.stream-stalled.after: 'soon' is not a duration; write e.g. 500ms, 30s");
        assertThatThrownBy(() -> read("alerts: {band: bayesian}"))
                .hasMessage("studies[0].alerts.band: unknown band method 'bayesian'; known: anytime-valid, fixed-horizon");
        assertThatThrownBy(() -> read("alerts: {webhooks: [{url: 'ftp://x/y'}]}"))
                .hasMessageStartingWith("studies[0].alerts.webhooks[0]: webhook url must be an http or https URL");
        assertThatThrownBy(() -> read("alerts: {webhooks: [{url: 'http://x/y', token-env: 'my token'}]}"))
                .hasMessageContaining("token-env must be an environment variable name");
        assertThatThrownBy(() -> read("alerts: {min-per-arm: 0}")).hasMessageContaining("min-per-arm must be at least 1");
        assertThatThrownBy(() -> read("alerts: {rules: {data-quality: {max-rejected-share: 1.5}}}"))
                .hasMessageContaining("max-rejected-share must lie in [0, 1)");
    }

    @Test
    @DisplayName("durations: short forms and ISO-8601")
    void durations() {
        assertThat(AlertConfigReader.parseDuration("500ms")).isEqualTo(Duration.ofMillis(500));
        assertThat(AlertConfigReader.parseDuration("30s")).isEqualTo(Duration.ofSeconds(30));
        assertThat(AlertConfigReader.parseDuration("5m")).isEqualTo(Duration.ofMinutes(5));
        assertThat(AlertConfigReader.parseDuration("2h")).isEqualTo(Duration.ofHours(2));
        assertThat(AlertConfigReader.parseDuration("1d")).isEqualTo(Duration.ofDays(1));
        assertThat(AlertConfigReader.parseDuration("PT90S")).isEqualTo(Duration.ofSeconds(90));
    }
}
