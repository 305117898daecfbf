package dev.bracket.stream;

import com.fasterxml.jackson.core.JsonFactory;
import com.fasterxml.jackson.core.JsonParser;
import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.core.JsonToken;
import com.fasterxml.jackson.core.StreamReadFeature;
import dev.bracket.config.FieldMapping;
import dev.bracket.config.StudyConfig;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.bounds.StudyCells;

import java.io.IOException;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

/**
 * Reads one JSON event and checks it:
 * the fields named by the {@link FieldMapping} must be present with the right types, the study
 * must be configured and the outcome must lie in that study's declared range. Fields the
 * mapping does not name are skipped. Never throws on bad input: the returned event carries a
 * {@link RejectReason} and a one-line detail instead.
 *
 * <p>Accepted forms: {@code treated} true/false or 1/0; {@code outcome} any JSON number;
 * {@code time} epoch milliseconds or an ISO-8601 instant with offset (absent: the record
 * timestamp); {@code stratum}, {@code instrument} strings or numbers (absent or null: none);
 * {@code unit} and {@code id} strings or numbers. One parser per thread.
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
    private static final JsonFactory JSON = JsonFactory.builder().enable(StreamReadFeature.USE_FAST_DOUBLE_PARSER).build();

    private final FieldMapping fields;
    private final StudyConfig[] studies;
    private final Map<String, Integer> studyIndex = new HashMap<>();
    private final int maxBytes;
    private final ParsedEvent event = new ParsedEvent();
    private final TextCache texts = new TextCache();
    private final FlatEventScanner scanner;

    public EventParser(List<StudyConfig> studies, FieldMapping fields, int maxBytes) {
        this.fields = fields;
        this.maxBytes = maxBytes;
        this.scanner = new FlatEventScanner(fields, texts);
        this.studies = studies.toArray(new StudyConfig[0]);
        for (int i = 0; i < this.studies.length; i++) {
            studyIndex.put(this.studies[i].id(), i);
        }
    }

    /**
     * Parses {@code bytes}. The result is this parser's reused holder: read it before the next call.
     *
     * @param recordTime the time to use when the event has no time field (epoch millis)
     */
    public ParsedEvent parse(byte[] bytes, long recordTime) {
        return parse(bytes, recordTime, true);
    }

    /** @param fast whether to try the fast path first (the tests compare both paths) */
    ParsedEvent parse(byte[] bytes, long recordTime, boolean fast) {
        ParsedEvent e = event;
        e.reset();
        if (bytes == null || bytes.length == 0) {
            return e.reject(RejectReason.BAD_JSON, "empty record (no bytes)");
        }
        if (bytes.length > maxBytes) {
            return e.reject(RejectReason.TOO_LARGE, bytes.length + " bytes exceed the limit of " + maxBytes + " (max-event-bytes)");
        }
        if (fast && scanner.scan(bytes, e)) {
            return complete(e, scanner.study, scanner.hasUnit, scanner.hasTreated, scanner.hasOutcome, recordTime);
        }
        e.reset();
        try (JsonParser p = JSON.createParser(bytes)) {
            return read(p, e, recordTime);
        } catch (JsonProcessingException ex) {
            return e.reject(RejectReason.BAD_JSON, "not valid JSON: " + firstLine(ex.getOriginalMessage()));
        } catch (IOException | RuntimeException ex) {
            return e.reject(RejectReason.BAD_JSON, "not readable as JSON: " + firstLine(String.valueOf(ex.getMessage())));
        }
    }

    private ParsedEvent read(JsonParser p, ParsedEvent e, long recordTime) throws IOException {
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
                    return wrongType(e, fields.study(), "a string", t);
                }
                studyId = text(p);
            } else if (name.equals(fields.unit())) {
                if (t != JsonToken.VALUE_STRING && t != JsonToken.VALUE_NUMBER_INT) {
                    return wrongType(e, fields.unit(), "a string or whole number", t);
                }
                hasUnit = true;
            } else if (name.equals(fields.treated())) {
                if (t == JsonToken.VALUE_TRUE || t == JsonToken.VALUE_FALSE) {
                    e.treated = t == JsonToken.VALUE_TRUE;
                } else if (t == JsonToken.VALUE_NUMBER_INT && (p.getLongValue() == 0 || p.getLongValue() == 1)) {
                    e.treated = p.getLongValue() == 1;
                } else {
                    return wrongType(e, fields.treated(), "true/false or 1/0", t);
                }
                hasTreated = true;
            } else if (name.equals(fields.outcome())) {
                if (t != JsonToken.VALUE_NUMBER_INT && t != JsonToken.VALUE_NUMBER_FLOAT) {
                    return wrongType(e, fields.outcome(), "a number", t);
                }
                e.outcome = p.getDoubleValue();
                hasOutcome = true;
            } else if (name.equals(fields.time())) {
                if (t == JsonToken.VALUE_NUMBER_INT) {
                    e.time = p.getLongValue();
                } else if (t == JsonToken.VALUE_STRING) {
                    long parsed = IsoTime.parseMillis(p.getTextCharacters(), p.getTextOffset(), p.getTextLength());
                    if (parsed == IsoTime.INVALID) {
                        return e.reject(RejectReason.WRONG_TYPE, "field '" + fields.time()
                                + "' must be epoch milliseconds or an ISO-8601 time like 2025-01-31T12:00:00Z, was '" + clip(p.getText()) + "'");
                    }
                    e.time = parsed;
                } else {
                    return wrongType(e, fields.time(), "epoch milliseconds or an ISO-8601 string", t);
                }
            } else if (name.equals(fields.stratum())) {
                if (t != JsonToken.VALUE_STRING && t != JsonToken.VALUE_NUMBER_INT) {
                    return wrongType(e, fields.stratum(), "a string or whole number", t);
                }
                e.stratum = text(p);
            } else if (name.equals(fields.instrument())) {
                if (t != JsonToken.VALUE_STRING && t != JsonToken.VALUE_NUMBER_INT) {
                    return wrongType(e, fields.instrument(), "a string or whole number", t);
                }
                e.instrument = text(p);
            } else if (name.equals(KIND_FIELD)) {
                String kind = t == JsonToken.VALUE_STRING ? p.getText() : null;
                if (!"exposure".equals(kind) && !"outcome".equals(kind)) {
                    return e.reject(RejectReason.WRONG_TYPE, "field '" + KIND_FIELD + "' must be \"exposure\" or \"outcome\", was "
                            + (kind == null ? describe(t) : "'" + clip(kind) + "'"));
                }
                e.exposure = kind.equals("exposure");
            } else if (name.equals(EXPOSED_FIELD)) {
                long parsed = t == JsonToken.VALUE_NUMBER_INT ? p.getLongValue()
                        : t == JsonToken.VALUE_STRING ? IsoTime.parseMillis(p.getTextCharacters(), p.getTextOffset(), p.getTextLength())
                        : IsoTime.INVALID;
                if (parsed == IsoTime.INVALID) {
                    return e.reject(RejectReason.WRONG_TYPE, "field '" + EXPOSED_FIELD
                            + "' must be epoch milliseconds or an ISO-8601 time like 2025-01-31T12:00:00Z");
                }
                e.exposedTime = parsed;
            } else if (name.equals(fields.id())) {
                if (t != JsonToken.VALUE_STRING && t != JsonToken.VALUE_NUMBER_INT) {
                    return wrongType(e, fields.id(), "a string or whole number", t);
                }
            } else {
                p.skipChildren();
            }
        }
        if (p.nextToken() != null) {
            return e.reject(RejectReason.BAD_JSON, "unexpected content after the event's closing brace");
        }
        return complete(e, studyId, hasUnit, hasTreated, hasOutcome, recordTime);
    }

    /** Checks what was read: required fields present, study configured, outcome in its range; fills the defaults. */
    private ParsedEvent complete(ParsedEvent e, String studyId, boolean hasUnit, boolean hasTreated, boolean hasOutcome, long recordTime) {
        if (studyId == null) {
            return missing(e, fields.study());
        }
        if (!hasUnit) {
            return missing(e, fields.unit());
        }
        if (!hasTreated) {
            return missing(e, fields.treated());
        }
        if (!hasOutcome && !e.exposure) {
            return missing(e, fields.outcome());
        }
        Integer index = studyIndex.get(studyId);
        if (index == null) {
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
        if (e.time == Long.MIN_VALUE) {
            e.time = recordTime;
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

    private static ParsedEvent missing(ParsedEvent e, String field) {
        return e.reject(RejectReason.MISSING_FIELD, "field '" + field + "' is missing (or null)");
    }

    private static ParsedEvent wrongType(ParsedEvent e, String field, String expected, JsonToken t) {
        return e.reject(RejectReason.WRONG_TYPE, "field '" + field + "' must be " + expected + ", was " + describe(t));
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
