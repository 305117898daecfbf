package dev.bracket.stream.ingest;

import com.fasterxml.jackson.core.JsonFactory;
import com.fasterxml.jackson.core.JsonParser;
import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.core.JsonToken;
import com.fasterxml.jackson.core.StreamReadFeature;
import dev.bracket.config.BracketConfig;
import dev.bracket.config.FieldMapping;
import dev.bracket.config.StudyConfig;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.bounds.StudyCells;

import java.io.IOException;
import java.time.Duration;
import java.time.Instant;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

/**
 * Reads one JSON event and checks it:
 * the fields named by the {@link FieldMapping} must be present with the right types, the study
 * must be configured and the outcome must lie in that study's declared range (and be one of its
 * two ends when the study declares a binary outcome). Fields the mapping does not name are
 * skipped. Never throws: the returned event carries a {@link RejectReason} and a one-line detail
 * instead, so no record can stop the monitor.
 *
 * <p>Accepted forms: {@code treated} true/false or 1/0; {@code outcome} any JSON number;
 * {@code time} epoch milliseconds or an ISO-8601 instant with offset, in years 1 to 9999 and at
 * most {@code max-clock-skew} ahead of the record timestamp and the clock (absent: the record
 * timestamp); {@code stratum}, {@code instrument} strings or numbers (absent or null: none);
 * {@code unit} and {@code id} strings or numbers. A key given twice in one object (at any depth)
 * rejects the event as {@code bad-json}, the detail naming the key. One parser per thread.
 *
 * <p>Exposure events: {@code "kind": "exposure"} says a unit entered the study in an arm
 * (study, unit, treated, time; no outcome, any outcome field is ignored). {@code "kind": "outcome"}
 * or no {@code kind} is an outcome event as before. An outcome event may carry
 * {@code "exposed"}: when its unit was exposed (epoch milliseconds or ISO-8601, like time), so
 * windows count the outcome in the window of its exposure; without it the outcome counts in the
 * window of its own time. The names {@code kind} and {@code exposed} are fixed (not mapped).
 *
 * <p>Events of the usual shape are read by {@link FlatEventScanner} straight from the bytes;
 * the others by Jackson's streaming parser (no tree, no data binding), whose messages name
 * what is wrong.
 */
public final class EventParser {

    /** Field saying what an event reports: {@code exposure} or {@code outcome} (the default). */
    public static final String KIND_FIELD = "kind";
    /** Optional field of an outcome event: when its unit was exposed. */
    public static final String EXPOSED_FIELD = "exposed";

    // FastDoubleParser rounds exactly like Double.parseDouble, only faster.
    // Duplicate detection: a key given twice (e.g. two outcomes) is an error, not "the last one wins".
    private static final JsonFactory JSON = JsonFactory.builder().enable(StreamReadFeature.USE_FAST_DOUBLE_PARSER)
            .enable(StreamReadFeature.STRICT_DUPLICATE_DETECTION).build();

    private final FieldMapping fields;
    private final StudyConfig[] studies;
    private final Map<String, Integer> studyIndex = new HashMap<>();
    private final int maxBytes;
    private final long skewMillis;
    private final ParsedEvent event = new ParsedEvent();
    private final TextCache texts = new TextCache();
    private final FlatEventScanner scanner;

    /**
     * @param maxClockSkew how far an event time may lie ahead of the record timestamp and the clock
     */
    public EventParser(List<StudyConfig> studies, FieldMapping fields, int maxBytes, Duration maxClockSkew) {
        this.fields = fields;
        this.maxBytes = maxBytes;
        this.skewMillis = saturatedMillis(maxClockSkew);
        this.scanner = new FlatEventScanner(fields, studies.stream().map(StudyConfig::id).toList(), texts);
        this.studies = studies.toArray(new StudyConfig[0]);
        for (int i = 0; i < this.studies.length; i++) {
            studyIndex.put(this.studies[i].id(), i);
        }
    }

    /** The parser for one input topic's events under this configuration. */
    public static EventParser forInput(BracketConfig config, FieldMapping fields) {
        return new EventParser(config.studies(), fields, config.maxEventBytes(), config.maxClockSkew());
    }

    /**
     * Parses {@code bytes} where the record's own time is the only clock (files: the replay's start time).
     * The result is this parser's reused holder: read it before the next call.
     *
     * @param recordTime the time to use when the event has no time field (epoch millis)
     */
    public ParsedEvent parse(byte[] bytes, long recordTime) {
        return parse(bytes, recordTime, recordTime);
    }

    /**
     * Parses {@code bytes}. Never throws: any failure rejects the event with a reason. The result is
     * this parser's reused holder: read it before the next call.
     *
     * @param recordTime the time to use when the event has no time field (epoch millis; negative: none)
     * @param now        the wall clock (epoch millis); event times more than max-clock-skew ahead of
     *                   it or of the record time are rejected
     */
    public ParsedEvent parse(byte[] bytes, long recordTime, long now) {
        return bytes == null ? parse(null, 0, 0, recordTime, now, true) : parse(bytes, 0, bytes.length, recordTime, now, true);
    }

    /**
     * The same for the event in {@code bytes[offset, offset + length)} (a record's value in the
     * consumer's fetch buffer, read without copying it out).
     */
    public ParsedEvent parse(byte[] bytes, int offset, int length, long recordTime, long now) {
        return parse(bytes, offset, length, recordTime, now, true);
    }

    /** @param fast whether to try the fast path first (the tests compare both paths) */
    ParsedEvent parse(byte[] bytes, long recordTime, long now, boolean fast) {
        return bytes == null ? parse(null, 0, 0, recordTime, now, fast) : parse(bytes, 0, bytes.length, recordTime, now, fast);
    }

    ParsedEvent parse(byte[] bytes, int offset, int length, long recordTime, long now, boolean fast) {
        try {
            return read(bytes, offset, length, recordTime, now, fast);
        } catch (RuntimeException ex) {
            event.reset();
            return event.reject(RejectReason.UNREADABLE, "reading the event failed (" + firstLine(ex.toString()) + ")");
        }
    }

    private ParsedEvent read(byte[] bytes, int offset, int length, long recordTime, long now, boolean fast) {
        ParsedEvent e = event;
        e.reset();
        if (bytes == null || length == 0) {
            return e.reject(RejectReason.BAD_JSON, "empty record (no bytes)");
        }
        if (length > maxBytes) {
            return e.reject(RejectReason.TOO_LARGE, length + " bytes exceed the limit of " + maxBytes + " (max-event-bytes)");
        }
        long clock = recordTime >= 0 ? Math.min(recordTime, now) : now;
        long latest = clock > Long.MAX_VALUE - skewMillis ? Long.MAX_VALUE : clock + skewMillis;
        if (fast && scanner.scan(bytes, offset, offset + length, e)) {
            return complete(e, scanner.study, scanner.studyIndex, scanner.hasUnit, scanner.hasTreated, scanner.hasOutcome, recordTime, latest);
        }
        e.reset();
        try (JsonParser p = JSON.createParser(bytes, offset, length)) {
            return read(p, e, recordTime, latest);
        } catch (JsonProcessingException ex) {
            return e.reject(RejectReason.BAD_JSON, "not valid JSON: " + firstLine(ex.getOriginalMessage()));
        } catch (IOException ex) {
            return e.reject(RejectReason.BAD_JSON, "not readable as JSON: " + firstLine(String.valueOf(ex.getMessage())));
        }
    }

    private ParsedEvent read(JsonParser p, ParsedEvent e, long recordTime, long latest) throws IOException {
        if (p.nextToken() != JsonToken.START_OBJECT) {
            return e.reject(RejectReason.BAD_JSON, "an event must be a JSON object");
        }
        String studyId = null;
        boolean hasUnit = false;
        boolean hasTreated = false;
        boolean hasOutcome = false;
        String name;
        while ((name = p.nextFieldName()) != null) {
            JsonToken t = p.nextToken();
            if (t == JsonToken.VALUE_NULL) {
                continue;
            }
            // Field names from the parser are canonicalised; equals() settles on the identity check.
            if (name.equals(fields.study())) {
                if (t != JsonToken.VALUE_STRING) {
                    skipWrong(p, e, fields.study(), "a string", t);
                    continue;
                }
                studyId = text(p);
            } else if (name.equals(fields.unit())) {
                if (t != JsonToken.VALUE_STRING && t != JsonToken.VALUE_NUMBER_INT) {
                    skipWrong(p, e, fields.unit(), "a string or whole number", t);
                    continue;
                }
                hasUnit = true;
            } else if (name.equals(fields.treated())) {
                if (t == JsonToken.VALUE_TRUE || t == JsonToken.VALUE_FALSE) {
                    e.treated = t == JsonToken.VALUE_TRUE;
                } else if (t == JsonToken.VALUE_NUMBER_INT && (p.getLongValue() == 0 || p.getLongValue() == 1)) {
                    e.treated = p.getLongValue() == 1;
                } else {
                    skipWrong(p, e, fields.treated(), "true/false or 1/0", t);
                    continue;
                }
                hasTreated = true;
            } else if (name.equals(fields.outcome())) {
                if (t != JsonToken.VALUE_NUMBER_INT && t != JsonToken.VALUE_NUMBER_FLOAT) {
                    skipWrong(p, e, fields.outcome(), "a number", t);
                    continue;
                }
                e.outcome = p.getDoubleValue();
                hasOutcome = true;
            } else if (name.equals(fields.time())) {
                if (t == JsonToken.VALUE_NUMBER_INT) {
                    if (p.getNumberType() == JsonParser.NumberType.BIG_INTEGER || !IsoTime.representable(p.getLongValue())) {
                        return unrepresentable(e, p.getText());
                    }
                    e.time = p.getLongValue();
                } else if (t == JsonToken.VALUE_STRING) {
                    long parsed = IsoTime.parseMillis(p.getTextCharacters(), p.getTextOffset(), p.getTextLength());
                    if (parsed == IsoTime.UNREPRESENTABLE) {
                        return unrepresentable(e, p.getText());
                    }
                    if (parsed == IsoTime.INVALID) {
                        firstProblem(e, RejectReason.WRONG_TYPE, "field '" + fields.time()
                                + "' must be epoch milliseconds or an ISO-8601 time like 2025-01-31T12:00:00Z, was '" + clip(p.getText()) + "'");
                        continue;
                    }
                    e.time = parsed;
                } else {
                    skipWrong(p, e, fields.time(), "epoch milliseconds or an ISO-8601 string", t);
                    continue;
                }
            } else if (name.equals(fields.stratum())) {
                if (t != JsonToken.VALUE_STRING && t != JsonToken.VALUE_NUMBER_INT) {
                    skipWrong(p, e, fields.stratum(), "a string or whole number", t);
                    continue;
                }
                e.stratum = text(p);
            } else if (name.equals(fields.instrument())) {
                if (t != JsonToken.VALUE_STRING && t != JsonToken.VALUE_NUMBER_INT) {
                    skipWrong(p, e, fields.instrument(), "a string or whole number", t);
                    continue;
                }
                e.instrument = text(p);
            } else if (name.equals(KIND_FIELD)) {
                if (t != JsonToken.VALUE_STRING) {
                    skipWrong(p, e, KIND_FIELD, "\"exposure\" or \"outcome\"", t);
                    continue;
                }
                String kind = p.getText();
                if (!"exposure".equals(kind) && !"outcome".equals(kind)) {
                    firstProblem(e, RejectReason.WRONG_TYPE, "field '" + KIND_FIELD + "' must be \"exposure\" or \"outcome\", was '"
                            + clip(kind) + "'");
                    continue;
                }
                e.exposure = kind.equals("exposure");
            } else if (name.equals(EXPOSED_FIELD)) {
                if (t != JsonToken.VALUE_NUMBER_INT && t != JsonToken.VALUE_STRING) {
                    skipWrong(p, e, EXPOSED_FIELD, "epoch milliseconds or an ISO-8601 string", t);
                    continue;
                }
                if (t == JsonToken.VALUE_NUMBER_INT
                        && (p.getNumberType() == JsonParser.NumberType.BIG_INTEGER || !IsoTime.representable(p.getLongValue()))) {
                    firstProblem(e, RejectReason.TIME_UNREPRESENTABLE, "field '" + EXPOSED_FIELD + "' is no representable time: '"
                            + clip(p.getText()) + "'");
                    continue;
                }
                long parsed = t == JsonToken.VALUE_NUMBER_INT ? p.getLongValue()
                        : IsoTime.parseMillis(p.getTextCharacters(), p.getTextOffset(), p.getTextLength());
                if (parsed == IsoTime.UNREPRESENTABLE) {
                    firstProblem(e, RejectReason.TIME_UNREPRESENTABLE, "field '" + EXPOSED_FIELD + "' is no representable time: '"
                            + clip(p.getText()) + "'");
                    continue;
                }
                if (parsed == IsoTime.INVALID) {
                    firstProblem(e, RejectReason.WRONG_TYPE, "field '" + EXPOSED_FIELD
                            + "' must be epoch milliseconds or an ISO-8601 time like 2025-01-31T12:00:00Z, was '" + clip(p.getText()) + "'");
                    continue;
                }
                e.exposedTime = parsed;
            } else if (name.equals(fields.id())) {
                if (t != JsonToken.VALUE_STRING && t != JsonToken.VALUE_NUMBER_INT) {
                    skipWrong(p, e, fields.id(), "a string or whole number", t);
                    continue;
                }
                e.id = p.getText(); // not through the text cache: ids rarely repeat
            } else {
                p.skipChildren();
            }
        }
        if (p.nextToken() != null) {
            return e.reject(RejectReason.BAD_JSON, "unexpected content after the event's closing brace");
        }
        if (!e.isUsable()) {
            return attribute(e, studyId);
        }
        return complete(e, studyId, -1, hasUnit, hasTreated, hasOutcome, recordTime, latest);
    }

    /**
     * Checks what was read: required fields present, study configured, outcome in its range, time
     * not after {@code latest}; fills the defaults.
     *
     * @param knownIndex the study's position when the reader already recognised its id, else -1
     */
    private ParsedEvent complete(ParsedEvent e, String studyId, int knownIndex, boolean hasUnit, boolean hasTreated,
                                 boolean hasOutcome, long recordTime, long latest) {
        if (studyId == null) {
            return missing(e, fields.study());
        }
        if (!hasUnit) {
            return attribute(missing(e, fields.unit()), studyId);
        }
        if (!hasTreated) {
            return attribute(missing(e, fields.treated()), studyId);
        }
        if (!hasOutcome && !e.exposure) {
            return attribute(missing(e, fields.outcome()), studyId);
        }
        int index = knownIndex >= 0 ? knownIndex : studyIndex.getOrDefault(studyId, -1);
        if (index < 0) {
            return e.reject(RejectReason.UNKNOWN_STUDY, "study '" + clip(studyId) + "' is not configured");
        }
        StudyConfig study = studies[index];
        e.study = study;
        e.studyIndex = index;
        OutcomeRange range = study.range();
        if (e.exposure) {
            e.outcome = Double.NaN; // an exposure has no outcome yet
        } else if (!range.contains(e.outcome)) {
            return e.reject(RejectReason.OUT_OF_RANGE, "outcome " + e.outcome + " lies outside [" + range.min() + ", "
                    + range.max() + "] declared for study '" + study.id() + "'");
        }
        if (!e.exposure && !range.admits(e.outcome)) {
            return e.reject(RejectReason.NOT_BINARY, "outcome " + e.outcome + " is neither " + range.min() + " nor " + range.max()
                    + ", the two values of the binary outcome declared for study '" + study.id() + "'");
        }
        if (e.time == Long.MIN_VALUE) {
            e.time = recordTime;
        }
        if (e.time > latest) {
            // Such a time would become the partition's stream time and close every real window.
            return e.reject(RejectReason.TIME_TOO_FAR_AHEAD, "time " + Instant.ofEpochMilli(e.time) + " lies more than "
                    + skewMillis / 1000 + " s (max-clock-skew) ahead of the record timestamp or the clock ("
                    + Instant.ofEpochMilli(latest - skewMillis) + ")");
        }
        if (e.stratum == null) {
            e.stratum = StudyCells.NONE;
        }
        if (e.instrument == null) {
            e.instrument = StudyCells.NONE;
        }
        return e;
    }

    private String text(JsonParser p) throws IOException {
        return texts.get(p.getTextCharacters(), p.getTextOffset(), p.getTextLength());
    }

    private ParsedEvent unrepresentable(ParsedEvent e, String text) {
        return e.reject(RejectReason.TIME_UNREPRESENTABLE, "field '" + fields.time() + "' must lie in years 1 to 9999, was '"
                + clip(text) + "'");
    }

    private static long saturatedMillis(Duration d) {
        try {
            return d.toMillis();
        } catch (ArithmeticException e) {
            return Long.MAX_VALUE;
        }
    }

    private static ParsedEvent missing(ParsedEvent e, String field) {
        return e.reject(RejectReason.MISSING_FIELD, "field '" + field + "' is missing (or null)");
    }

    /**
     * Notes a wrongly typed field (the first problem is the one reported) and skips its value:
     * reading on finds the study, so that the rejection counts toward that study's data quality.
     */
    private static void skipWrong(JsonParser p, ParsedEvent e, String field, String expected, JsonToken t) throws IOException {
        firstProblem(e, RejectReason.WRONG_TYPE, "field '" + field + "' must be " + expected + ", was " + describe(t));
        p.skipChildren();
    }

    private static void firstProblem(ParsedEvent e, RejectReason reason, String why) {
        if (e.isUsable()) {
            e.reject(reason, why);
        }
    }

    /** Names the study of a rejected event when it names a configured one. */
    private ParsedEvent attribute(ParsedEvent e, String studyId) {
        Integer index = studyId == null ? null : studyIndex.get(studyId);
        if (index != null) {
            e.study = studies[index];
            e.studyIndex = index;
        }
        return e;
    }

    private static String describe(JsonToken t) {
        return switch (t) {
            case VALUE_STRING -> "a string";
            case VALUE_NUMBER_INT -> "a whole number";
            case VALUE_NUMBER_FLOAT -> "a decimal number";
            case VALUE_TRUE, VALUE_FALSE -> "a boolean";
            case START_OBJECT -> "an object";
            case START_ARRAY -> "an array";
            default -> t.toString();
        };
    }

    private static String clip(String s) {
        return s.length() <= 80 ? s : s.substring(0, 77) + "...";
    }

    private static String firstLine(String s) {
        return s == null ? "" : clip(s.lines().findFirst().orElse(""));
    }
}
