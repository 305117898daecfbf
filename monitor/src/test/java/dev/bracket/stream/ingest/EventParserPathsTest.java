package dev.bracket.stream.ingest;

import dev.bracket.stream.TestEvents;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.Direction;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.config.FieldMapping;
import dev.bracket.config.StudyConfig;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Random;

import static org.assertj.core.api.Assertions.assertThat;

/**
 * The parser's fast path ({@link FlatEventScanner}) against Jackson's streaming parser as the
 * reference: on every input, well-formed or not, both paths must give the same event or the
 * same rejection with the same words.
 */
class EventParserPathsTest {

    private static final List<StudyConfig> STUDIES = List.of(
            new StudyConfig("checkout", new OutcomeRange(0, 1, Direction.LOWER), AssumptionSet.eachSingle()),
            new StudyConfig("registry", new OutcomeRange(-5, 5, Direction.HIGHER), AssumptionSet.eachSingle()));
    private static final long RECORD_TIME = 1_700_000_000_000L;

    private final EventParser parser = new EventParser(STUDIES, FieldMapping.DEFAULT, 4096, Duration.ofHours(1));
    private final Random rnd = new Random(20261201);

    @Test
    @DisplayName("hand-picked edge cases read the same on both paths")
    void edgeCases() {
        String[] inputs = {
                "{\"study\":\"checkout\",\"unit\":\"u\",\"treated\":true,\"outcome\":-0,\"time\":5}",
                "{\"study\":\"checkout\",\"unit\":\"u\",\"treated\":true,\"outcome\":-0.0,\"time\":5}",
                "{\"study\":\"checkout\",\"unit\":\"u\",\"treated\":true,\"outcome\":0.1e1,\"time\":-5}",
                "{\"study\":\"checkout\",\"unit\":\"u\",\"treated\":1,\"outcome\":1E-400,\"time\":5}",
                "{\"study\":\"checkout\",\"unit\":\"u\",\"treated\":0,\"outcome\":0.30000000000000004441,\"time\":5}",
                "{\"study\":\"checkout\",\"unit\":\"u\",\"treated\":0,\"outcome\":9007199254740993e-16,\"time\":5}",
                "{\"study\":\"registry\",\"unit\":12,\"treated\":0,\"outcome\":-4.999999999999999999,\"time\":\"2025-01-31T12:00:00Z\"}",
                "{\"study\":\"registry\",\"unit\":12,\"treated\":0,\"outcome\":1,\"time\":\"2025-01-31T12:00:00+02:00\",\"stratum\":-7}",
                "{\"study\":\"registry\",\"unit\":12,\"treated\":0,\"outcome\":1,\"time\":99999999999999999999}",
                "{\"study\":\"registry\",\"unit\":12,\"treated\":0,\"outcome\":123456789012345678901234567890}",
                "{\"study\":\"registry\",\"unit\":12,\"treated\":0,\"outcome\":01}",
                "{\"study\":\"registry\",\"unit\":12,\"treated\":0,\"outcome\":1.}",
                "{\"study\":\"registry\",\"unit\":12,\"treated\":0,\"outcome\":.5}",
                "{\"study\":\"registry\",\"unit\":12,\"treated\":0,\"outcome\":+1}",
                "{\"study\":\"registry\",\"unit\":12,\"treated\":0,\"outcome\":1,}",
                "{\"study\":\"registry\",\"unit\":12,\"treated\":0,\"outcome\":1}x",
                "{\"study\":\"registry\",\"unit\":12,\"treated\":0,\"outcome\":1} {}",
                "\uFEFF{\"study\":\"registry\",\"unit\":12,\"treated\":0,\"outcome\":1}",
                " \t\r\n{ \"study\" : \"registry\" , \"unit\" : \"a\" , \"treated\" : false , \"outcome\" : 2 } \n",
                "{\"study\":\"regis\\u0074ry\",\"unit\":\"a\",\"treated\":false,\"outcome\":2}",
                "{\"study\":\"registry\",\"unit\":\"é\",\"treated\":false,\"outcome\":2}",
                "{\"study\":\"registry\",\"study\":null,\"unit\":\"a\",\"treated\":false,\"treated\":true,\"outcome\":2}",
                "{\"study\":\"registry\",\"unit\":\"a\",\"treated\":2,\"outcome\":2}",
                "{\"study\":\"registry\",\"unit\":\"a\",\"treated\":truex,\"outcome\":2}",
                "{\"study\":\"registry\",\"unit\":\"a\",\"treated\":nul,\"outcome\":2}",
                "{\"study\":\"registry\",\"unit\":\"a\",\"treated\":true,\"outcome\":2,\"time\":1.5}",
                "{\"study\":\"registry\",\"unit\":\"a\",\"treated\":true,\"outcome\":2,\"time\":\"yesterday\"}",
                "{\"study\":\"registry\",\"unit\":\"a\",\"treated\":true,\"outcome\":2,\"x\":[1,{\"y\":2}]}",
                "{\"study\":\"registry\",\"unit\":\"a\",\"treated\":true,\"outcome\":2,\"stratum\":1e3}",
                "{\"study\":\"nobody\",\"unit\":\"a\",\"treated\":true,\"outcome\":2}",
                "{\"study\":\"checkout\",\"unit\":\"a\",\"treated\":true,\"outcome\":2}",
                "{\"study\":\"checkout\",\"unit\":\"a\",\"treated\":true}",
                "{}", "{ }", "[]", "\"checkout\"", "{\"study\"}", "{\"study\":}", "{study:1}", "{\"a\":1 \"b\":2}",
                "{\"study\":\"checkout\",\"unit\":\"a\",\"treated\":true,\"outcome\":1,\"note\":\"tab\there\"}",
                "{\"study\":\"checkout\",\"unit\":\"a\",\"treated\":true,\"outcome\":0.2,\"outcome\":0.9}",
                "{\"study\":\"checkout\",\"unit\":\"a\",\"treated\":true,\"outcome\":0.2,\"x\":1,\"y\":2,\"x\":3}",
                "{\"study\":\"checkout\",\"unit\":\"a\",\"treated\":true,\"outcome\":0.2,\"id\":\"e-1\"}",
                "{\"study\":\"checkout\",\"unit\":\"a\",\"treated\":true,\"outcome\":0.2,\"id\":\"e-1\",\"id\":\"e-1\"}",
                "{\"a\":1,\"b\":1,\"c\":1,\"d\":1,\"e\":1,\"f\":1,\"g\":1,\"h\":1,\"i\":1,\"j\":1,\"k\":1,\"l\":1,\"m\":1,\"n\":1,"
                        + "\"study\":\"checkout\",\"unit\":\"a\",\"treated\":true,\"outcome\":0.2}",
                // Whole numbers around the eight-digit steps, and the bytes next to the digits ('/' and ':').
                "{\"study\":\"checkout\",\"unit\":12345678,\"treated\":1,\"outcome\":1,\"time\":1234567}",
                "{\"study\":\"checkout\",\"unit\":1,\"treated\":1,\"outcome\":1,\"time\":12345678}",
                "{\"study\":\"checkout\",\"unit\":1,\"treated\":1,\"outcome\":1,\"time\":123456789}",
                "{\"study\":\"checkout\",\"unit\":1,\"treated\":1,\"outcome\":1,\"time\":1234567890123456}",
                "{\"study\":\"checkout\",\"unit\":1,\"treated\":1,\"outcome\":1,\"time\":12345678901234567}",
                "{\"study\":\"checkout\",\"unit\":1,\"treated\":1,\"outcome\":1,\"time\":123456789012345678}",
                "{\"study\":\"checkout\",\"unit\":1,\"treated\":1,\"outcome\":1,\"time\":-999999999999999999}",
                "{\"study\":\"checkout\",\"unit\":1,\"treated\":1,\"outcome\":1,\"time\":1234567/901234}",
                "{\"study\":\"checkout\",\"unit\":1,\"treated\":1,\"outcome\":1,\"time\":1234567:901234}",
                "{\"study\":\"checkout\",\"unit\":1,\"treated\":1,\"outcome\":1,\"time\":12345670901234}",
                "{\"study\":\"checkout\",\"unit\":1,\"treated\":1,\"outcome\":1,\"time\":1735689600000 }",
                "{\"study\":\"checkout\",\"unit\":1,\"treated\":1,\"outcome\":10000000000000000,\"time\":5}",
                // Study ids and keys cut short, or running on, where they are compared eight bytes at a time.
                "{\"study\":\"checkou\",\"unit\":1,\"treated\":1,\"outcome\":1}",
                "{\"study\":\"checkoutx\",\"unit\":1,\"treated\":1,\"outcome\":1}",
                "{\"study\":\"checkout",
                "{\"studyx\":\"checkout\",\"unit\":1,\"treated\":1,\"outcome\":1}",
                "{\"stud\":\"checkout\",\"unit\":1,\"treated\":1,\"outcome\":1}",
                "{\"outcome\":1,\"treated\":1,\"unit\":1,\"study\":\"registry\"}",
                "{\"study\":\"checkout\",\"unit\":\"a long unit name of more than sixteen bytes\",\"treated\":1,\"outcome\":1}",
                "{\"study\":\"checkout\",\"unit\":\"a long unit name with a \u0001 control\",\"treated\":1,\"outcome\":1}",
                "{\"study\":\"checkout\",\"unit\":\"a long unit name \\\"with an escape\",\"treated\":1,\"outcome\":1}",
                "{\"study\":\"checkout\",\"unit\":\"a long unit name caf\u00e9 and more\",\"treated\":1,\"outcome\":1}",
        };
        for (String input : inputs) {
            assertSame(input.getBytes(StandardCharsets.UTF_8));
        }
    }

    @Test
    @DisplayName("random events, some with their bytes damaged, read the same on both paths")
    void randomEvents() {
        int fast = 0;
        for (int i = 0; i < 100_000; i++) {
            byte[] event = randomEvent().getBytes(StandardCharsets.UTF_8);
            if (rnd.nextInt(4) == 0) {
                event = damage(event);
            }
            if (event.length > 0 && assertSame(event)) {
                fast++;
            }
        }
        // About one in eight generated events is usable and plain: both paths are compared on those too.
        assertThat(fast).isGreaterThan(10_000);
    }

    @Test
    @DisplayName("usable events of the usual shape (the streaming tests' events) all take the fast path")
    void usualEventsTakeTheFastPath() {
        FlatEventScanner scanner = new FlatEventScanner(FieldMapping.DEFAULT, STUDIES.stream().map(StudyConfig::id).toList(), new TextCache());
        for (TestEvents.Event e : TestEvents.stream(2_000, 0, 5)) {
            assertThat(scanner.scan(e.value(), new ParsedEvent())).as(new String(e.value(), StandardCharsets.UTF_8)).isTrue();
            assertSame(e.value());
        }
    }

    /**
     * Asserts both paths agree on {@code bytes}, also when the event lies inside a larger array
     * (as in the consumer's fetch buffer) between bytes that would continue it; says whether the
     * fast path alone could read it.
     */
    private boolean assertSame(byte[] bytes) {
        String input = new String(bytes, StandardCharsets.UTF_8);
        String reference = describe(parser.parse(bytes, RECORD_TIME, RECORD_TIME, false));
        String fast = describe(parser.parse(bytes, RECORD_TIME, RECORD_TIME, true));
        assertThat(fast).as(input).isEqualTo(reference);
        byte[] before = surrounding();
        byte[] after = surrounding();
        byte[] inside = new byte[before.length + bytes.length + after.length];
        System.arraycopy(before, 0, inside, 0, before.length);
        System.arraycopy(bytes, 0, inside, before.length, bytes.length);
        System.arraycopy(after, 0, inside, before.length + bytes.length, after.length);
        for (boolean path : new boolean[] {true, false}) {
            String within = describe(parser.parse(inside, before.length, bytes.length, RECORD_TIME, RECORD_TIME, path));
            assertThat(within).as("%s between %s and %s", input, new String(before, StandardCharsets.ISO_8859_1),
                    new String(after, StandardCharsets.ISO_8859_1)).isEqualTo(reference);
        }
        return new FlatEventScanner(FieldMapping.DEFAULT, STUDIES.stream().map(StudyConfig::id).toList(), new TextCache()).scan(bytes, new ParsedEvent());
    }

    private static String describe(ParsedEvent e) {
        if (!e.isUsable()) {
            return e.rejection() + ": " + e.detail() + " (study " + (e.study() == null ? null : e.study().id()) + ", " + e.studyIndex() + ")";
        }
        return e.study().id() + "#" + e.studyIndex() + " id=" + e.id() + " treated=" + e.treated() + " outcome=" + Double.doubleToRawLongBits(e.outcome())
                + " (" + e.outcome() + ") time=" + e.time() + " stratum=" + e.stratum() + " instrument=" + e.instrument();
    }

    private String randomEvent() {
        List<String> fields = new ArrayList<>();
        fields.add(q("study") + ":" + pick(q("checkout"), q("registry"), q("other"), "null", "3", q("checkout")));
        fields.add(q("unit") + ":" + pick(q("u" + rnd.nextInt(100)), String.valueOf(rnd.nextInt(100)), "null", "true", "1.5"));
        fields.add(q("treated") + ":" + pick("true", "false", "1", "0", "null", "2", q("yes"), "-0", "1.0"));
        fields.add(q("outcome") + ":" + number());
        if (rnd.nextBoolean()) {
            fields.add(q("time") + ":" + pick(String.valueOf(rnd.nextLong() >> rnd.nextInt(64)), q("2025-01-31T12:00:00Z"),
                    q("2025-01-31T12:00:00.123+05:30"), q("2025-02-30T12:00:00Z"), "null", "1.0e3", q("soon")));
        }
        if (rnd.nextBoolean()) {
            fields.add(q("stratum") + ":" + pick(q("a"), q("b"), "7", "-12", "null", "0.5", q("")));
        }
        if (rnd.nextBoolean()) {
            fields.add(q("instrument") + ":" + pick(q("z0"), q("z1"), "1", "null", "false"));
        }
        if (rnd.nextInt(4) == 0) {
            fields.add(q("id") + ":" + pick(q("e-1"), "17", "null", "[1]", "1e2"));
        }
        if (rnd.nextInt(4) == 0) {
            fields.add(q(pick("note", "extra", "Study", "outcome ")) + ":" + pick(q("x"), "{\"a\":[1,2]}", "[]", "true", "null", "-1.5E+3",
                    q("a\\\"b"), q("caf\u00e9")));
        }
        if (rnd.nextInt(8) == 0) {
            fields.add(fields.get(rnd.nextInt(fields.size()))); // a repeated field
        }
        if (rnd.nextInt(3) == 0) {
            Collections.shuffle(fields, rnd);
        }
        StringBuilder sb = new StringBuilder(space()).append('{');
        for (int i = 0; i < fields.size(); i++) {
            sb.append(i == 0 ? "" : ",").append(space()).append(fields.get(i)).append(space());
        }
        return sb.append('}').append(space()).toString();
    }

    private String number() {
        return switch (rnd.nextInt(12)) {
            case 0 -> "0";
            case 1 -> "1";
            case 2 -> String.valueOf(rnd.nextDouble());
            case 3 -> String.valueOf(rnd.nextDouble() * 10 - 5);
            case 4 -> String.format(java.util.Locale.ROOT, "%.3f", rnd.nextDouble() * 10 - 5);
            case 5 -> String.valueOf(rnd.nextInt(11) - 5);
            case 6 -> (rnd.nextBoolean() ? "-" : "") + rnd.nextInt(1000) + "e" + (rnd.nextBoolean() ? "-" : "") + rnd.nextInt(30);
            case 7 -> "0." + "0".repeat(rnd.nextInt(25)) + rnd.nextInt(1_000_000);
            case 8 -> String.valueOf(rnd.nextLong());
            case 9 -> pick("-0", "-0.0", "0.0", "1E400", "4.9e-324", "2.2250738585072014E-308", "123456789012345678901234");
            case 10 -> pick("null", q("0.5"), "true", "1.", "-", "01", "0x1");
            default -> String.valueOf(Double.longBitsToDouble(rnd.nextLong()));
        };
    }

    private byte[] damage(byte[] b) {
        int at = rnd.nextInt(b.length);
        byte[] chars = "{}[]\",: -.0e1\\tnx\u00ff".getBytes(StandardCharsets.ISO_8859_1);
        return switch (rnd.nextInt(3)) {
            case 0 -> { // delete a byte
                byte[] out = new byte[b.length - 1];
                System.arraycopy(b, 0, out, 0, at);
                System.arraycopy(b, at + 1, out, at, b.length - at - 1);
                yield out;
            }
            case 1 -> { // replace a byte
                byte[] out = b.clone();
                out[at] = chars[rnd.nextInt(chars.length)];
                yield out;
            }
            default -> { // cut the end off
                byte[] out = new byte[at];
                System.arraycopy(b, 0, out, 0, at);
                yield out;
            }
        };
    }

    /** Up to 20 bytes that could continue or precede an event: digits, quotes, braces, letters, spaces. */
    private byte[] surrounding() {
        byte[] pool = "0123456789\"}{,: e.-truefalsnul\\".getBytes(StandardCharsets.ISO_8859_1);
        byte[] out = new byte[rnd.nextInt(21)];
        for (int i = 0; i < out.length; i++) {
            out[i] = pool[rnd.nextInt(pool.length)];
        }
        return out;
    }

    private String space() {
        return rnd.nextInt(4) == 0 ? pick(" ", "\n", "\t ", "\r\n") : "";
    }

    private String pick(String... options) {
        return options[rnd.nextInt(options.length)];
    }

    private static String q(String s) {
        return "\"" + s + "\"";
    }
}
