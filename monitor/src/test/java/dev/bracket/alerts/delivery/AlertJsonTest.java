package dev.bracket.alerts.delivery;

import dev.bracket.alerts.AlertEvaluator;
import dev.bracket.alerts.AlertKey;
import dev.bracket.alerts.AlertRule;
import dev.bracket.alerts.AlertState;
import dev.bracket.alerts.AlertTransition;
import dev.bracket.alerts.AssumptionsRefutedRule;
import dev.bracket.alerts.Evidence;
import dev.bracket.alerts.Snapshots;
import dev.bracket.alerts.StudyAlertConfig;
import dev.bracket.alerts.Verdict;
import dev.bracket.report.Cautions;
import com.fasterxml.jackson.databind.JsonNode;
import dev.bracket.bands.BandMethod;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.IdentifiedInterval;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.time.Duration;
import java.util.List;
import java.util.Map;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

@DisplayName("Alert documents (schema bracket.alert/2)")
class AlertJsonTest {

    @Test
    @DisplayName("a per-row document carries key, assumptions in words, numbers, time, id and cautions")
    void cellDocument() {
        AlertKey key = Transitions.key("rollout", "mtr-positive,mts-negative");
        AlertTransition t = Transitions.alternating(key, 1).get(0);
        JsonNode doc = AlertJson.toJson(t);

        assertThat(doc.path("schema").asText()).isEqualTo("bracket.alert/2");
        assertThat(doc.path("transitionId").asText()).isEqualTo(t.transitionId());
        assertThat(doc.path("key").asText()).isEqualTo("rollout/mtr-positive,mts-negative/cumulative/sign-identified");
        assertThat(doc.path("study").asText()).isEqualTo("rollout");
        assertThat(doc.path("scope").asText()).isEqualTo("row");
        assertThat(doc.path("assumptions")).extracting(JsonNode::asText).containsExactly("mtr-positive", "mts-negative");
        assertThat(doc.path("window").asText()).isEqualTo("cumulative");
        assertThat(doc.path("rule").asText()).isEqualTo("sign-identified");
        assertThat(doc.path("state").asText()).isEqualTo("firing");
        assertThat(doc.path("variant").asText()).isEqualTo("positive");
        assertThat(doc.path("sequence").asLong()).isEqualTo(1);
        assertThat(doc.path("at").asText()).isEqualTo("2026-03-01T09:00:00Z");
        assertThat(doc.path("summary").asText()).startsWith("sign of the effect identified: positive");
        JsonNode ev = doc.path("evidence");
        assertThat(ev.path("arms").path("treated").path("n").asLong()).isEqualTo(100);
        assertThat(ev.path("arms").path("control").path("mean").asDouble()).isEqualTo(0.4);
        assertThat(ev.path("interval").path("lower").asDouble()).isEqualTo(0.2);
        assertThat(ev.path("interval").path("status").asText()).isEqualTo("bounded");
        assertThat(ev.path("band").path("method").asText()).isEqualTo("anytime");
        assertThat(ev.path("band").path("status").asText()).isEqualTo("bounded");
        assertThat(ev.path("band").path("basis").asText()).isEqualTo("constructed for the test");
        assertThat(ev.path("band").path("level").asDouble()).isEqualTo(0.95);
        assertThat(ev.path("band").path("lower").asDouble()).isEqualTo(0.05);
        assertThat(ev.path("limits").has("clearZeroMargin")).isTrue();
        assertThat(doc.path("cautions")).extracting(JsonNode::asText).containsExactlyElementsOf(Cautions.ALL);
        assertThat(doc.path("cautions").toString()).contains("only as credible as its assumptions")
                .contains("not clinical or operational advice").contains("local regulation");
    }

    @Test
    @DisplayName("the meaning is the assumption set in words")
    void meaning() {
        AssumptionSet set = AssumptionSet.parse("mts-negative");
        AlertEvaluator e = new AlertEvaluator(Map.of("rollout", StudyAlertConfig.defaults()),
                java.time.Clock.fixed(Snapshots.T0, java.time.ZoneOffset.UTC));
        AlertTransition t = e.evaluate(Snapshots.of("rollout", "mts-negative", Snapshots.arms(100, 0.6, 100, 0.4),
                0.05, 0.7, Snapshots.T0)).get(0);
        assertThat(AlertJson.toJson(t).path("meaning").asText()).isEqualTo(set.meaning()).contains("monotone treatment selection");
    }

    @Test
    @DisplayName("numbers that do not exist are null, never NaN: a refuted interval has no ends")
    void refutedIntervalHasNullEnds() {
        Evidence ev = new Evidence.OfBand(Snapshots.arms(100, 0.4, 100, 0.6), IdentifiedInterval.refuted(),
                Snapshots.band(BandMethod.ANYTIME, 0.05, -0.1), Map.of());
        AlertKey key = new AlertKey("rollout", "mtr-positive,mts-positive", "cumulative", AlertRule.ASSUMPTIONS_REFUTED);
        AlertTransition t = AlertState.initial(key).next(new AssumptionsRefutedRule(0).judge(IdentifiedInterval.refuted(),
                Snapshots.band(BandMethod.ANYTIME, 0.05, -0.1)), ev, Snapshots.T0, 1, "m").transitions().get(0);
        String text = AlertJson.toText(t);
        assertThat(text).doesNotContain("NaN");
        JsonNode interval = AlertJson.toJson(t).path("evidence").path("interval");
        assertThat(interval.path("status").asText()).isEqualTo("refuted");
        assertThat(interval.path("lower").isNull()).isTrue();
        JsonNode band = AlertJson.toJson(t).path("evidence").path("band");
        assertThat(band.path("status").asText()).isEqualTo("refuted");
        assertThat(band.path("lower").isNull()).isTrue();
        assertThat(t.summary()).contains("anytime 95% band (refuted)");
    }

    @Test
    @DisplayName("per-study documents have study scope and their own evidence")
    void studyDocuments() {
        AlertKey key = AlertKey.perStudy("rollout", AlertRule.DATA_QUALITY);
        Evidence.OfQuality q = new Evidence.OfQuality(Duration.ofMinutes(10), 90, 10, 4, 0, 0.05);
        AlertTransition t = AlertState.initial(key).next(Verdict.met("", "10 of 100 rejected"), q, Snapshots.T0, 1, "")
                .transitions().get(0);
        JsonNode doc = AlertJson.toJson(t);
        assertThat(doc.path("scope").asText()).isEqualTo("study");
        assertThat(doc.has("assumptions")).isFalse();
        assertThat(doc.path("key").asText()).isEqualTo("rollout/*/*/data-quality");
        assertThat(doc.path("evidence").path("rejectedShare").asDouble()).isEqualTo(0.1);
        assertThat(doc.path("evidence").path("outOfRange").asLong()).isEqualTo(4);
        assertThat(doc.path("evidence").path("periodSeconds").asDouble()).isEqualTo(600);
    }

    @Test
    @DisplayName("a document restores the state it left; a foreign document is refused with a reason")
    void restoreRoundTrip() {
        List<AlertTransition> ts = Transitions.alternating(Transitions.key("rollout", "mts-negative"), 2);
        assertThat(AlertJson.restoreState(AlertJson.toText(ts.get(0)))).isEqualTo(AlertState.after(ts.get(0)));
        assertThat(AlertJson.restoreState(AlertJson.toText(ts.get(1)))).isEqualTo(AlertState.after(ts.get(1)));
        assertThatThrownBy(() -> AlertJson.restoreState("{\"schema\":\"bracket.bounds/2\"}"))
                .hasMessageContaining("not a bracket.alert/2 document");
        assertThatThrownBy(() -> AlertJson.restoreState("{\"schema\":\"bracket.alert/2\",\"state\":\"firing\"}"))
                .hasMessageContaining("lacks text field 'key'");
    }

    @Test
    @DisplayName("the log line is one readable line with state, key, sequence, summary and id")
    void logLine() {
        List<AlertTransition> ts = Transitions.alternating(Transitions.key("rollout", "mts-negative"), 2);
        String fired = LogAlertSink.line(ts.get(0));
        assertThat(fired).doesNotContain("\n")
                .startsWith("alert FIRING rollout/mts-negative/cumulative/sign-identified #1: sign of the effect identified: positive")
                .contains(ts.get(0).transitionId())
                .contains("only as credible as its assumptions").contains("not clinical or operational advice")
                .contains("local regulation");
        assertThat(LogAlertSink.line(ts.get(1))).startsWith("alert RESOLVED rollout/mts-negative/cumulative/sign-identified #2")
                .contains("firing since 2026-03-01T09:00:00Z");
        // A stalled stream rests on no assumption: neither its line nor its document speaks of them.
        AlertTransition stall = Transitions.alternating(AlertKey.perStudy("rollout", AlertRule.STREAM_STALLED), 1).get(0);
        assertThat(LogAlertSink.line(stall)).startsWith("alert FIRING rollout").doesNotContain("assumptions");
        assertThat(AlertJson.toJson(stall).path("cautions")).isEmpty();
    }
}
