package dev.bracket.stream.ingest;

import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.Direction;
import dev.bracket.bounds.OutcomeKind;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.config.FieldMapping;
import dev.bracket.config.StudyConfig;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.util.List;

import static org.assertj.core.api.Assertions.assertThat;

class EventParserTest {

    private static final List<StudyConfig> STUDIES = List.of(
            new StudyConfig("checkout", new OutcomeRange(0, 1, Direction.LOWER), AssumptionSet.eachSingle()));
    private static final long RECORD_TIME = 1_700_000_000_000L;

    private final EventParser parser = new EventParser(STUDIES, FieldMapping.DEFAULT, 512, Duration.ofHours(1));

    private ParsedEvent parse(String json) {
        return parser.parse(json.getBytes(StandardCharsets.UTF_8), RECORD_TIME);
    }

    @Test
    @DisplayName("an exposure event needs no outcome, also for a binary outcome; a bad kind or exposed time names its study")
    void exposureEvents() {
        EventParser binary = new EventParser(List.of(new StudyConfig("registry",
                new OutcomeRange(0, 1, Direction.HIGHER, OutcomeKind.BINARY), AssumptionSet.eachSingle())),
                FieldMapping.DEFAULT, 512, Duration.ofHours(1));
        ParsedEvent exposure = binary.parse("{\"kind\":\"exposure\",\"study\":\"registry\",\"unit\":\"p1\",\"treated\":true,\"time\":1000}"
                .getBytes(StandardCharsets.UTF_8), RECORD_TIME);
        assertThat(exposure.isUsable()).as(exposure.detail()).isTrue();
        assertThat(exposure.isExposure()).isTrue();
        ParsedEvent outcome = binary.parse("{\"study\":\"registry\",\"unit\":\"p1\",\"treated\":true,\"outcome\":1,\"exposed\":\"1970-01-01T00:00:01Z\"}"
                .getBytes(StandardCharsets.UTF_8), RECORD_TIME);
        assertThat(outcome.isUsable()).as(outcome.detail()).isTrue();
        assertThat(outcome.exposedTime()).isEqualTo(1000L);
        ParsedEvent badKind = parse("{\"kind\":\"visit\",\"study\":\"checkout\",\"unit\":\"u\",\"treated\":true}");
        assertThat(badKind.rejection()).isEqualTo(RejectReason.WRONG_TYPE);
        assertThat(badKind.study().id()).isEqualTo("checkout");
        ParsedEvent nestedKind = parse("{\"kind\":{\"a\":1},\"study\":\"checkout\",\"unit\":\"u\",\"treated\":true,\"outcome\":0}");
        assertThat(nestedKind.rejection()).isEqualTo(RejectReason.WRONG_TYPE);
        assertThat(nestedKind.study().id()).isEqualTo("checkout");
        ParsedEvent hugeExposed = parse("{\"study\":\"checkout\",\"unit\":\"u\",\"treated\":true,\"outcome\":0,\"exposed\":123456789012345678901234}");
        assertThat(hugeExposed.rejection()).isEqualTo(RejectReason.TIME_UNREPRESENTABLE);
        assertThat(hugeExposed.study().id()).isEqualTo("checkout");
    }

    @Test
    @DisplayName("a complete event is read with all its fields")
    void readsCompleteEvent() {
        ParsedEvent e = parse("""
                {"study":"checkout","unit":"host-7","treated":true,"outcome":0.25,"time":1700000123456,
                 "stratum":"eu","instrument":"wave-2","id":"e-1","extra":{"nested":[1,2,{"x":null}]}}""");
        assertThat(e.isUsable()).isTrue();
        assertThat(e.study().id()).isEqualTo("checkout");
        assertThat(e.treated()).isTrue();
        assertThat(e.outcome()).isEqualTo(0.25);
        assertThat(e.time()).isEqualTo(1_700_000_123_456L);
        assertThat(e.stratum()).isEqualTo("eu");
        assertThat(e.instrument()).isEqualTo("wave-2");
        assertThat(e.id()).isEqualTo("e-1");
    }

    @Test
    @DisplayName("a key given twice is rejected as bad-json naming the key, on both parsing paths, nested objects too")
    void duplicateKeysRejected() {
        String[] inputs = {
                "{\"study\":\"checkout\",\"unit\":1,\"treated\":true,\"outcome\":0.2,\"outcome\":0.9}",
                "{\"study\":\"checkout\",\"unit\":1,\"treated\":true,\"outcome\":0.2,\"note\":1,\"note\":1}",
                "{\"study\":\"checkout\",\"unit\":1,\"treated\":true,\"outcome\":0.2,\"x\":{\"a\":1,\"a\":2}}",
        };
        String[] keys = {"outcome", "note", "a"};
        for (int i = 0; i < inputs.length; i++) {
            byte[] bytes = inputs[i].getBytes(StandardCharsets.UTF_8);
            for (boolean fast : new boolean[] {true, false}) {
                ParsedEvent e = parser.parse(bytes, RECORD_TIME, RECORD_TIME, fast);
                assertThat(e.rejection()).as(inputs[i]).isEqualTo(RejectReason.BAD_JSON);
                assertThat(e.detail()).as(inputs[i]).contains("Duplicate field '" + keys[i] + "'");
            }
        }
        // The same key once, and an id given as a number, are fine.
        ParsedEvent ok = parse("{\"study\":\"checkout\",\"unit\":1,\"treated\":true,\"outcome\":0.2,\"id\":17}");
        assertThat(ok.isUsable()).isTrue();
        assertThat(ok.id()).isEqualTo("17");
    }

    @Test
    @DisplayName("optional fields default: no stratum, no instrument, the record's timestamp")
    void optionalFieldsDefault() {
        ParsedEvent e = parse("{\"study\":\"checkout\",\"unit\":12,\"treated\":0,\"outcome\":1}");
        assertThat(e.isUsable()).isTrue();
        assertThat(e.treated()).isFalse();
        assertThat(e.outcome()).isEqualTo(1.0);
        assertThat(e.time()).isEqualTo(RECORD_TIME);
        assertThat(e.stratum()).isEmpty();
        assertThat(e.instrument()).isEmpty();
    }

    @Test
    @DisplayName("ISO-8601 times with Z or an offset are read as instants")
    void readsIsoTimes() {
        assertThat(parse("{\"study\":\"checkout\",\"unit\":\"u\",\"treated\":1,\"outcome\":0,\"time\":\"2024-03-01T10:00:00Z\"}").time())
                .isEqualTo(1_709_287_200_000L);
        assertThat(parse("{\"study\":\"checkout\",\"unit\":\"u\",\"treated\":1,\"outcome\":0,\"time\":\"2024-03-01T12:00:00+02:00\"}").time())
                .isEqualTo(1_709_287_200_000L);
    }

    @Test
    @DisplayName("field names follow the topic's mapping")
    void followsFieldMapping() {
        FieldMapping m = new FieldMapping("experiment", "host", "canary", "error_rate", "ts", "region", "wave", "event_id");
        EventParser mapped = new EventParser(STUDIES, m, 512, Duration.ofHours(1));
        ParsedEvent e = mapped.parse("{\"experiment\":\"checkout\",\"host\":\"h\",\"canary\":true,\"error_rate\":0.5,\"region\":\"us\"}"
                .getBytes(StandardCharsets.UTF_8), RECORD_TIME);
        assertThat(e.isUsable()).isTrue();
        assertThat(e.stratum()).isEqualTo("us");
        assertThat(mapped.parse("{\"study\":\"checkout\",\"unit\":\"h\",\"treated\":true,\"outcome\":0.5}"
                .getBytes(StandardCharsets.UTF_8), RECORD_TIME).rejection()).isEqualTo(RejectReason.MISSING_FIELD);
    }

    @ParameterizedTest(name = "{0} -> {1}")
    @CsvSource(delimiter = '|', value = {
            "{\"study\":\"checkout\",\"unit\":\"u\",\"treated\":true                  | bad-json      | not valid JSON",
            "[1,2,3]                                                                   | bad-json      | must be a JSON object",
            "{\"study\":\"checkout\",\"unit\":\"u\",\"treated\":true,\"outcome\":0.1} {} | bad-json      | unexpected content",
            "{\"study\":\"checkout\",\"treated\":true,\"outcome\":0.1}                  | missing-field | field 'unit' is missing",
            "{\"study\":\"checkout\",\"unit\":\"u\",\"treated\":true,\"outcome\":null}  | missing-field | field 'outcome' is missing",
            "{\"study\":\"checkout\",\"unit\":\"u\",\"treated\":\"yes\",\"outcome\":0}  | wrong-type    | field 'treated' must be true/false or 1/0, was a string",
            "{\"study\":\"checkout\",\"unit\":\"u\",\"treated\":2,\"outcome\":0}        | wrong-type    | field 'treated' must be true/false or 1/0",
            "{\"study\":\"checkout\",\"unit\":\"u\",\"treated\":1,\"outcome\":\"0.3\"}  | wrong-type    | field 'outcome' must be a number, was a string",
            "{\"study\":\"checkout\",\"unit\":\"u\",\"treated\":1,\"outcome\":0,\"time\":\"yesterday\"} | wrong-type | field 'time' must be epoch milliseconds or an ISO-8601 time",
            "{\"study\":7,\"unit\":\"u\",\"treated\":1,\"outcome\":0}                   | wrong-type    | field 'study' must be a string, was a whole number",
            "{\"study\":\"pricing\",\"unit\":\"u\",\"treated\":1,\"outcome\":0}         | unknown-study | study 'pricing' is not configured",
            "{\"study\":\"checkout\",\"unit\":\"u\",\"treated\":1,\"outcome\":1.5}      | out-of-range  | outcome 1.5 lies outside [0.0, 1.0] declared for study 'checkout'",
            "{\"study\":\"checkout\",\"unit\":\"u\",\"treated\":1,\"outcome\":-1e400}   | out-of-range  | outcome -Infinity lies outside",
    })
    @DisplayName("unusable events are rejected with a reason and a one-line detail")
    void rejectsUnusableEvents(String json, String reason, String detail) {
        ParsedEvent e = parse(json.strip());
        assertThat(e.isUsable()).isFalse();
        assertThat(e.rejection().id()).isEqualTo(reason.strip());
        assertThat(e.detail()).contains(detail.strip()).doesNotContain("\n");
    }

    @ParameterizedTest(name = "{0} -> {1}")
    @CsvSource(delimiter = '|', value = {
            "\"+999999999-12-31T23:59:59Z\" | time-unrepresentable | must lie in years 1 to 9999",
            "\"0000-12-31T23:59:59Z\"       | time-unrepresentable | must lie in years 1 to 9999",
            "99999999999999999999999        | time-unrepresentable | must lie in years 1 to 9999",
            "-9223372036854775808           | time-unrepresentable | must lie in years 1 to 9999",
            "253402300800000                | time-unrepresentable | must lie in years 1 to 9999",
            "\"9999-12-31T23:59:59Z\"       | time-too-far-ahead   | ahead of the record timestamp or the clock",
            "1700003600001                  | time-too-far-ahead   | more than 3600 s (max-clock-skew)",
    })
    @DisplayName("times that cannot be represented or lie too far ahead are rejected on both parsing paths")
    void rejectsUnusableTimes(String time, String reason, String detail) {
        byte[] json = ("{\"study\":\"checkout\",\"unit\":\"u\",\"treated\":1,\"outcome\":0,\"time\":" + time.strip() + "}")
                .getBytes(StandardCharsets.UTF_8);
        for (boolean fast : new boolean[] {true, false}) {
            ParsedEvent e = parser.parse(json, RECORD_TIME, RECORD_TIME, fast);
            assertThat(e.isUsable()).as("fast path " + fast).isFalse();
            assertThat(e.rejection().id()).isEqualTo(reason.strip());
            assertThat(e.detail()).contains(detail.strip()).doesNotContain("\n");
        }
    }

    @Test
    @DisplayName("max-clock-skew: up to the skew ahead of the earlier of record time and clock is accepted, beyond it rejected")
    void clockSkewLimit() {
        String at = "{\"study\":\"checkout\",\"unit\":\"u\",\"treated\":1,\"outcome\":0,\"time\":%d}";
        long hour = 3_600_000L;
        assertThat(parser.parse(String.format(at, RECORD_TIME + hour).getBytes(StandardCharsets.UTF_8), RECORD_TIME).isUsable()).isTrue();
        // The record timestamp is late, the clock is not: the clock decides.
        ParsedEvent e = parser.parse(String.format(at, RECORD_TIME + hour + 1).getBytes(StandardCharsets.UTF_8),
                RECORD_TIME + 5 * hour, RECORD_TIME);
        assertThat(e.rejection()).isEqualTo(RejectReason.TIME_TOO_FAR_AHEAD);
        // Without a time field the record timestamp is the event time, and is checked against the clock.
        e = parser.parse("{\"study\":\"checkout\",\"unit\":\"u\",\"treated\":1,\"outcome\":0}".getBytes(StandardCharsets.UTF_8),
                RECORD_TIME + 2 * hour, RECORD_TIME);
        assertThat(e.rejection()).isEqualTo(RejectReason.TIME_TOO_FAR_AHEAD);
        // A record without a timestamp (-1, old message format) is judged by the clock alone.
        assertThat(parser.parse(String.format(at, RECORD_TIME).getBytes(StandardCharsets.UTF_8), -1, RECORD_TIME).isUsable()).isTrue();
    }

    @Test
    @DisplayName("truncated JSON is bad JSON, empty records and records over the size limit are rejected")
    void rejectsBrokenAndOversizedRecords() {
        assertThat(parse("{\"study\":\"checkout\",\"unit\":\"u\"").rejection()).isEqualTo(RejectReason.BAD_JSON);
        assertThat(parser.parse(new byte[0], RECORD_TIME).rejection()).isEqualTo(RejectReason.BAD_JSON);
        assertThat(parser.parse(null, RECORD_TIME).rejection()).isEqualTo(RejectReason.BAD_JSON);
        String big = "{\"study\":\"checkout\",\"unit\":\"u\",\"treated\":1,\"outcome\":0,\"pad\":\"" + "x".repeat(600) + "\"}";
        ParsedEvent e = parse(big);
        assertThat(e.rejection()).isEqualTo(RejectReason.TOO_LARGE);
        assertThat(e.detail()).contains("exceed the limit of 512");
        assertThat(parser.parse(new byte[] {(byte) 0xC3, 0x28}, RECORD_TIME).rejection()).isEqualTo(RejectReason.BAD_JSON);
    }

    @Test
    @DisplayName("the parser recovers: a good event after a bad one is read in full")
    void recoversAfterBadEvent() {
        parse("{\"study\":\"checkout\",\"unit\":\"u\",\"treated\":1,\"outcome\":9,\"stratum\":\"x\"}");
        ParsedEvent e = parse("{\"study\":\"checkout\",\"unit\":\"u\",\"treated\":1,\"outcome\":0.5}");
        assertThat(e.isUsable()).isTrue();
        assertThat(e.stratum()).isEmpty();
        assertThat(e.detail()).isNull();
    }
}
