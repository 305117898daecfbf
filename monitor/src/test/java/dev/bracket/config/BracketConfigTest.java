package dev.bracket.config;

import dev.bracket.bands.BandMethod;
import dev.bracket.bounds.Assumption;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.Direction;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.time.Duration;
import java.util.List;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

class BracketConfigTest {

    private static final String ONE_STUDY = "studies:\n  - id: s\n    outcome: {min: 0, max: 1}\n";

    private static final String FULL = """
            studies:
              - id: checkout-retry-policy
                outcome: {min: 0, max: 1, better: lower}
                assume: [[worst-case], [mts-negative], [optimizing-selection, sorting-on-gains]]
              - id: registry-site-a
                outcome: {min: -5, max: 5}
            inputs:
              - topic: outcomes
                fields: {treated: canary, outcome: error_rate}
              - topic: outcomes-eu
            topics:
              rejected: bad-events
              partitions: 6
            windows:
              - {name: hourly, kind: tumbling, size: 1h}
              - {name: last-day, kind: sliding, size: 24h, step: 1h}
            grace: 30s
            band-level: 0.9
            bands: anytime
            commit-interval: 250ms
            publish-interval: 2s
            group-members: 2
            group: checkout-monitor
            instance: host-a
            kafka:
              bootstrap.servers: broker-1:9093
              security.protocol: SASL_SSL
              sasl.mechanism: SCRAM-SHA-512
            """;

    @Test
    @DisplayName("a full configuration is read with every value and default")
    void readsFullConfiguration() {
        BracketConfig c = BracketConfig.parse("full.yaml", FULL);

        assertThat(c.studies()).hasSize(2);
        StudyConfig first = c.studies().get(0);
        assertThat(first.range().better()).isEqualTo(Direction.LOWER);
        assertThat(first.assumptions()).containsExactly(
                AssumptionSet.of(Assumption.WORST_CASE), AssumptionSet.of(Assumption.MTS_NEGATIVE),
                AssumptionSet.of(Assumption.OPTIMIZING_SELECTION, Assumption.SORTING_ON_GAINS));
        assertThat(c.studies().get(1).assumptions()).isEqualTo(AssumptionSet.eachSingle());
        assertThat(c.studies().get(1).range().better()).isEqualTo(Direction.HIGHER);

        assertThat(c.inputs().get(0).fields().treated()).isEqualTo("canary");
        assertThat(c.inputs().get(0).fields().outcome()).isEqualTo("error_rate");
        assertThat(c.inputs().get(0).fields().study()).isEqualTo("study");
        assertThat(c.inputs().get(1).fields()).isEqualTo(FieldMapping.DEFAULT);

        assertThat(c.topics().rejected()).isEqualTo("bad-events");
        assertThat(c.topics().partials()).isEqualTo("bracket-partials");
        assertThat(c.topics().partitions()).isEqualTo(6);

        assertThat(c.windows()).extracting(WindowSpec::name).containsExactly("cumulative", "hourly", "last-day");
        WindowSpec sliding = c.windows().get(2);
        assertThat(sliding.panesPerWindow()).isEqualTo(24);
        assertThat(sliding.paneMillis()).isEqualTo(3_600_000L);
        assertThat(c.grace()).isEqualTo(Duration.ofSeconds(30));
        assertThat(c.commitInterval()).isEqualTo(Duration.ofMillis(250));
        assertThat(c.publishInterval()).isEqualTo(Duration.ofSeconds(2));
        assertThat(c.bandLevel()).isEqualTo(0.9);
        assertThat(c.bands().methods()).containsExactly(BandMethod.ANYTIME);
        assertThat(c.groupMembers()).isEqualTo(2);
        assertThat(c.group()).isEqualTo("checkout-monitor");
        assertThat(c.instance()).isEqualTo("host-a");
        assertThat(c.kafka()).containsEntry("security.protocol", "SASL_SSL").containsEntry("sasl.mechanism", "SCRAM-SHA-512");
        assertThat(c.usesEmbeddedBroker()).isFalse();
    }

    @Test
    @DisplayName("a minimal configuration gets the documented defaults and the embedded broker")
    void minimalConfigurationUsesDefaults() {
        BracketConfig c = BracketConfig.parse("min.yaml", "studies:\n  - id: s\n    outcome: {min: 0, max: 1}\n");
        assertThat(c.usesEmbeddedBroker()).isTrue();
        assertThat(c.inputs()).containsExactly(new InputTopic("bracket-events", FieldMapping.DEFAULT));
        assertThat(c.windows()).containsExactly(WindowSpec.CUMULATIVE);
        assertThat(c.commitInterval()).isEqualTo(Duration.ofSeconds(1));
        assertThat(c.groupMembers()).isEqualTo(1);
        assertThat(c.publishInterval()).isEqualTo(Duration.ofMillis(500));
        assertThat(c.bandLevel()).isEqualTo(0.95);
        assertThat(c.bands().methods()).containsExactlyInAnyOrder(BandMethod.values());
        assertThat(c.brokerDataDir().toString()).endsWith("bracket/kafka");
        assertThat(c.withBootstrapServers("localhost:1").usesEmbeddedBroker()).isFalse();
        // Without instance: a name that survives a restart (the same on every parse), from group and host.
        assertThat(c.instance()).startsWith("bracket-").matches("[A-Za-z0-9._-]+")
                .isEqualTo(BracketConfig.parse("min.yaml", "studies:\n  - id: s\n    outcome: {min: 0, max: 1}\n").instance());
        assertThat(BracketConfig.parse("g.yaml", "group: other\nstudies:\n  - id: s\n    outcome: {min: 0, max: 1}\n").instance())
                .isEqualTo("other-" + c.instance().substring("bracket-".length()));
    }

    @Test
    @DisplayName("a sliding window's pane is its step and panes start on multiples of it")
    void panesAlignToStep() {
        WindowSpec w = new WindowSpec("w", WindowSpec.Kind.SLIDING, Duration.ofMinutes(10), Duration.ofMinutes(5));
        assertThat(w.paneStart(0)).isZero();
        assertThat(w.paneStart(299_999)).isZero();
        assertThat(w.paneStart(300_000)).isEqualTo(300_000);
        assertThat(w.paneStart(-1)).isEqualTo(-300_000);
        assertThat(WindowSpec.CUMULATIVE.paneStart(123_456)).isZero();
    }

    @Test
    @DisplayName("broken rules are reported with file, line, column and the rule")
    void reportsLocationAndRule() {
        String base = ONE_STUDY;
        assertError(base.replace("max: 1", "max: 0"), "c.yaml:3:28: studies[0].outcome.max must be greater than min");
        assertError(base.replace("min: 0", "min: zero"), "c.yaml:3:20: studies[0].outcome.min must be a number, was 'zero'");
        assertError(base + "    assume: [[mtr-positive, mts-sideways]]\n", "c.yaml:4:14: studies[0].assume[0] unknown assumption 'mts-sideways'");
        assertError(base + "commit-interval: soon\n", "c.yaml:4:18: commit-interval must be a duration like");
        assertError(base + "comit-interval: 1s\n", "c.yaml:4:1: unknown key 'comit-interval' in the top level");
        assertError(base + "windows:\n  - {name: w, kind: sliding, size: 1h, step: 7m}\n", "c.yaml:5:46: windows[0].step must divide the size");
        assertError(base + "windows:\n  - {name: cumulative, kind: tumbling, size: 1h}\n", "c.yaml:5:12: windows[0].name repeats the window name");
        assertError(base + "bands: some\n", "c.yaml:4:8: bands must be both, fixed, anytime or none");
        assertError(base + "band-level: 95\n", "c.yaml:4:13: band-level must lie strictly between 0 and 1");
        assertError(base + "inputs:\n  - topic: 'bad topic'\n", "c.yaml:5:12: inputs[0].topic must be a Kafka topic name");
        assertError("studies: []\n", "c.yaml:1:10: studies must list at least one study");
        assertError("group: g\n", "c.yaml:1:1: the top level needs the key 'studies'");
        assertError("studies: [\n", "c.yaml:1:11: not valid YAML");
        assertError("", "c.yaml: empty configuration");
    }

    @Test
    @DisplayName("durations too long for time arithmetic, or finer than a millisecond, are refused with their place")
    void durationLimits() {
        // 200000 days is past Long.MAX_VALUE nanoseconds (about 292 years), where Duration.toNanos throws ArithmeticException (its JDK javadoc).
        assertError(ONE_STUDY + "grace: 200000d\n", "c.yaml:4:8: grace is too long: at most 36500d (100 years), was '200000d'");
        assertError(ONE_STUDY + "grace: 99999999999999999999d\n", "c.yaml:4:8: grace is too long");
        assertError(ONE_STUDY + "commit-interval: PT9999999999999999H\n", "c.yaml:4:18: commit-interval is too long");
        assertError(ONE_STUDY + "windows:\n  - {name: w, kind: tumbling, size: 200000d}\n", "c.yaml:5:37: windows[0].size is too long");
        assertError(ONE_STUDY + "alerts: {check-interval: 36501d}\n", "c.yaml:4:26: alerts.check-interval is too long");
        assertThat(BracketConfig.parse("c.yaml", ONE_STUDY + "grace: 36500d\n").grace()).isEqualTo(Duration.ofDays(36_500));
        assertThat(BracketConfig.parse("c.yaml", ONE_STUDY + "grace: 1.5s\n").grace()).isEqualTo(Duration.ofMillis(1_500));
        assertThat(BracketConfig.parse("c.yaml", ONE_STUDY + "grace: PT0.25S\n").grace()).isEqualTo(Duration.ofMillis(250));
    }

    @Test
    @DisplayName("a sliding step below a millisecond (a zero pane length) is refused, in short and ISO-8601 form")
    void stepsBelowOneMillisecond() {
        String base = ONE_STUDY + "windows:\n";
        assertError(base + "  - {name: w, kind: sliding, size: 1s, step: 0.1ms}\n",
                "c.yaml:5:46: windows[0].step must be a whole number of milliseconds, was '0.1ms'");
        assertError(base + "  - {name: w, kind: sliding, size: 1s, step: PT0.0001S}\n",
                "c.yaml:5:46: windows[0].step must be a whole number of milliseconds, was 'PT0.0001S'");
        assertError(base + "  - {name: w, kind: tumbling, size: 0.4ms}\n", "c.yaml:5:37: windows[0].size must be a whole number of milliseconds");
        WindowSpec finest = BracketConfig.parse("c.yaml", base + "  - {name: w, kind: sliding, size: 1s, step: 1ms}\n").windows().get(1);
        assertThat(finest.paneMillis()).isEqualTo(1);
        assertThat(finest.panesPerWindow()).isEqualTo(1_000);
    }

    @Test
    @DisplayName("partitions and replication outside their ranges are refused with the range, not capped")
    void topicCountsOutOfRange() {
        assertError(ONE_STUDY + "topics: {partitions: 1000000000000}\n", "c.yaml:4:22: topics.partitions must be from 1 to 10000, was 1000000000000");
        assertError(ONE_STUDY + "topics: {partitions: 10001}\n", "c.yaml:4:22: topics.partitions must be from 1 to 10000");
        // A topic's replication factor is a 16-bit signed number in Kafka's CreateTopics request (Kafka protocol guide).
        assertError(ONE_STUDY + "topics: {replication: 40000}\n", "c.yaml:4:23: topics.replication must be from 1 to 32767");
        assertThat(BracketConfig.parse("c.yaml", ONE_STUDY + "topics: {partitions: 10000, replication: 3}\n").topics())
                .extracting(TopicNames::partitions, TopicNames::replicationFactor).containsExactly(10_000, (short) 3);
    }

    @Test
    @DisplayName("a key given twice in one mapping is refused at its second place, naming the first")
    void repeatedKeys() {
        assertError(ONE_STUDY + "grace: 1s\ngrace: 2s\n", "c.yaml:5:1: grace is given twice in one mapping (first at line 4, column 1); keep one");
        assertError("studies:\n  - id: s\n    id: t\n    outcome: {min: 0, max: 1}\n",
                "c.yaml:3:5: studies[0].id is given twice in one mapping (first at line 2, column 5)");
        assertError(ONE_STUDY.replace("max: 1}", "max: 1, min: 0.5}"), "c.yaml:3:31: studies[0].outcome.min is given twice in one mapping (first at line 3, column 15)");
        // The same key in two different mappings is fine.
        assertThat(BracketConfig.parse("c.yaml", ONE_STUDY + "  - id: t\n    outcome: {min: 0, max: 1}\n").studies()).hasSize(2);
    }

    @Test
    @DisplayName("valid YAML aliases and merge keys are named as such, at the alias")
    void aliasesAreNamed() {
        String anchored = "studies:\n  - id: s\n    outcome: &range {min: 0, max: 1}\n  - id: t\n    outcome: *range\n";
        assertError(anchored, "c.yaml:5:14: studies[1].outcome is the YAML alias *range; Bracket does not expand anchors (&) and aliases (*)");
        assertError("studies:\n  - id: s\n    outcome: {min: 0, max: 1, <<: {better: lower}}\n",
                "c.yaml:3:31: studies[0].outcome.<< is a YAML merge key");
        // An anchor nobody refers to changes nothing.
        assertThat(BracketConfig.parse("c.yaml", "studies:\n  - id: s\n    outcome: &range {min: 0, max: 1}\n").studies()).hasSize(1);
    }

    private static void assertError(String yaml, String expectedStart) {
        assertThatThrownBy(() -> BracketConfig.parse("c.yaml", yaml))
                .isInstanceOf(ConfigError.class)
                .hasMessageStartingWith(expectedStart);
    }

    @Test
    @DisplayName("assumption sets may also be written as comma-separated strings")
    void assumptionSetsAsStrings() {
        BracketConfig c = BracketConfig.parse("c.yaml",
                "studies:\n  - id: s\n    outcome: {min: 0, max: 1}\n    assume: ['mtr-positive,mts-positive', worst-case]\n");
        assertThat(c.studies().get(0).assumptions()).isEqualTo(List.of(
                AssumptionSet.of(Assumption.MTR_POSITIVE, Assumption.MTS_POSITIVE), AssumptionSet.of(Assumption.WORST_CASE)));
    }
}
