package dev.bracket.stream.ingest;

import dev.bracket.config.FieldMapping;

import java.nio.charset.StandardCharsets;
import java.util.Arrays;
import java.util.List;

/**
 * The parser's fast path: reads an event of the usual shape straight from its bytes — one flat
 * JSON object, ASCII text without escapes, strings, numbers, true, false and null as values —
 * in one pass with no parser object, and declines everything else: nesting, escapes, non-ASCII
 * bytes, a value of the wrong type, a malformed or very long number, content after the object.
 * A declined event is read again by Jackson, which then finds the same values or says exactly
 * what is wrong. Fields mean what they mean on the Jackson path of {@link EventParser} (the same
 * order of field names, null skipped); an object with a repeated key, or with more than
 * {@value #MAX_FIELDS} keys, is declined, so that Jackson's duplicate detection names the key. The
 * test compares the two paths on every input it makes.
 *
 * <p>Fast because it does little per byte: strings are searched eight bytes at a time, the
 * mapped field names and the configured study ids are compared where they are expected (the key
 * order of the last event is tried first), and a repeated mapped key is found by a bit per field.
 */
final class FlatEventScanner {

    /** Numbers longer than this are left to Jackson (which also enforces its own length limit). */
    private static final int MAX_NUMBER_LENGTH = 64;
    /** Objects with more keys are left to Jackson (keys are compared pairwise for repeats). */
    static final int MAX_FIELDS = 16;
    /** Exact powers of ten as doubles (10^22 is the largest one a double holds exactly). */
    private static final double[] POWERS_OF_TEN = new double[23];
    private static final long EXACT_MANTISSA = 1L << 53;

    static {
        double p = 1;
        for (int i = 0; i < POWERS_OF_TEN.length; i++) {
            POWERS_OF_TEN[i] = p;
            p *= 10;
        }
    }

    // Field numbers in the order EventParser compares names.
    private static final int STUDY = 0;
    private static final int UNIT = 1;
    private static final int TREATED = 2;
    private static final int OUTCOME = 3;
    private static final int TIME = 4;
    private static final int STRATUM = 5;
    private static final int INSTRUMENT = 6;
    // Exposure fields: events carrying them take the Jackson path.
    private static final int KIND = 7;
    private static final int EXPOSED = 8;
    private static final int ID = 9;

    // Value kinds.
    private static final int STRING = 0;
    private static final int INT = 1;
    private static final int FLOAT = 2;
    private static final int TRUE = 3;
    private static final int FALSE = 4;
    private static final int NULL = 5;

    private static final long ONES = 0x0101010101010101L;
    private static final long HIGH_BITS = 0x8080808080808080L;

    /** The mapped field names in the order above. */
    private final QuotedText[] names;
    /** The configured study ids, in configuration order. */
    private final QuotedText[] studies;
    private final TextCache texts;
    private final char[] chars = new char[64];
    // Where each key the mapping does not name starts and ends, to find a repeated one.
    private final int[] otherStarts = new int[MAX_FIELDS];
    private final int[] otherEnds = new int[MAX_FIELDS];
    // The field of each key position in the last event read (-1: another key): events of one
    // producer keep their keys in one order, so this is first tried for the next event.
    private final int[] lastOrder = new int[MAX_FIELDS];
    private int lastStudy;

    // What scan() found, besides the values it put into the event.
    String study;
    /** The study's position in the configured list when scan() recognised its id, else -1. */
    int studyIndex;
    boolean hasUnit;
    boolean hasTreated;
    boolean hasOutcome;

    /** Where the event being read ends in its array. */
    private int limit;

    // The value just read.
    private int kind;
    private int valueStart;
    private int valueEnd;
    private long longValue;

    /** @param studyIds the configured study ids, in configuration order */
    FlatEventScanner(FieldMapping fields, List<String> studyIds, TextCache texts) {
        this.texts = texts;
        String[] ordered = {fields.study(), fields.unit(), fields.treated(), fields.outcome(), fields.time(),
                fields.stratum(), fields.instrument(), EventParser.KIND_FIELD, EventParser.EXPOSED_FIELD, fields.id()};
        names = new QuotedText[ordered.length];
        for (int i = 0; i < ordered.length; i++) {
            names[i] = new QuotedText(ordered[i]);
        }
        studies = studyIds.stream().map(QuotedText::new).toArray(QuotedText[]::new);
        Arrays.fill(lastOrder, -1);
    }

    /**
     * Reads {@code b} into {@code e} (a reset event) and the fields of this scanner.
     *
     * @return false when the event is not of the shape read here; {@code e} is then partly filled
     */
    boolean scan(byte[] b, ParsedEvent e) {
        return scan(b, 0, b.length, e);
    }

    /** The same for the event in {@code b[from, to)}. */
    boolean scan(byte[] b, int from, int to, ParsedEvent e) {
        limit = to;
        study = null;
        studyIndex = -1;
        hasUnit = false;
        hasTreated = false;
        hasOutcome = false;
        int n = to;
        int i = skipSpace(b, from);
        if (i >= n || b[i] != '{') {
            return false;
        }
        i = skipSpace(b, i + 1);
        if (i < n && b[i] == '}') {
            return skipSpace(b, i + 1) == n;
        }
        int keys = 0;
        int mapped = 0; // bit f: field f was given
        int others = 0;
        while (true) {
            if (i >= n || b[i] != '"' || keys == MAX_FIELDS) {
                return false;
            }
            int nameStart = i + 1;
            int field = lastOrder[keys];
            int nameEnd;
            if (field >= 0 && names[field].at(b, nameStart, n)) {
                nameEnd = nameStart + names[field].length();
            } else {
                nameEnd = stringEnd(b, nameStart);
                if (nameEnd < 0) {
                    return false;
                }
                field = field(b, nameStart, nameEnd);
                lastOrder[keys] = field;
            }
            // A repeated key is declined, so that Jackson's duplicate detection names it.
            if (field >= 0) {
                if ((mapped & (1 << field)) != 0) {
                    return false;
                }
                mapped |= 1 << field;
            } else {
                if (repeated(b, nameStart, nameEnd, others)) {
                    return false;
                }
                otherStarts[others] = nameStart;
                otherEnds[others++] = nameEnd;
            }
            keys++;
            i = skipSpace(b, nameEnd + 1);
            if (i >= n || b[i] != ':') {
                return false;
            }
            i = skipSpace(b, i + 1);
            if (!value(b, i, field) || !use(b, field, e)) {
                return false;
            }
            i = skipSpace(b, valueEnd);
            if (i >= n) {
                return false;
            }
            if (b[i] == '}') {
                return skipSpace(b, i + 1) == n;
            }
            if (b[i] != ',') {
                return false;
            }
            i = skipSpace(b, i + 1);
        }
    }

    /** Applies the value just read to the field, as EventParser's Jackson path does; false where that path would reject it. */
    private boolean use(byte[] b, int field, ParsedEvent e) {
        if (kind == NULL) {
            return true;
        }
        switch (field) {
            case STUDY -> {
                if (kind != STRING) {
                    return false;
                }
                if (studyIndex < 0) {
                    study = text(b);
                }
            }
            case UNIT -> {
                if (kind != STRING && kind != INT) {
                    return false;
                }
                hasUnit = true;
            }
            case TREATED -> {
                if (kind == TRUE || kind == FALSE) {
                    e.treated = kind == TRUE;
                } else if (kind == INT && (longValue == 0 || longValue == 1)) {
                    e.treated = longValue == 1;
                } else {
                    return false;
                }
                hasTreated = true;
            }
            case OUTCOME -> {
                if (kind == INT) {
                    e.outcome = longValue; // as Jackson: a whole number becomes a double by conversion
                } else if (kind == FLOAT) {
                    e.outcome = floatValue(b);
                } else {
                    return false;
                }
                hasOutcome = true;
            }
            case TIME -> {
                if (kind == INT && IsoTime.representable(longValue)) {
                    e.time = longValue;
                } else if (kind == STRING && valueEnd - valueStart - 2 <= chars.length) {
                    int len = valueEnd - valueStart - 2;
                    for (int k = 0; k < len; k++) {
                        chars[k] = (char) b[valueStart + 1 + k];
                    }
                    long t = IsoTime.parseMillis(chars, 0, len);
                    if (t == IsoTime.INVALID || t == IsoTime.UNREPRESENTABLE) {
                        return false; // Jackson's path names the problem
                    }
                    e.time = t;
                } else {
                    return false;
                }
            }
            case STRATUM, INSTRUMENT -> {
                if (kind != STRING && kind != INT) {
                    return false;
                }
                if (field == STRATUM) {
                    e.stratum = text(b);
                } else {
                    e.instrument = text(b);
                }
            }
            case ID -> {
                if (kind != STRING && kind != INT) {
                    return false;
                }
                // Not through the text cache: ids rarely repeat. Plain ASCII here, so one byte is one char.
                e.id = kind == STRING ? new String(b, valueStart + 1, valueEnd - valueStart - 2, StandardCharsets.ISO_8859_1)
                        : new String(b, valueStart, valueEnd - valueStart, StandardCharsets.ISO_8859_1);
            }
            case KIND, EXPOSED -> {
                return false;
            }
            default -> {
                // a field the mapping does not name: any plain value is skipped
            }
        }
        return true;
    }

    /** Whether one of the first {@code others} unmapped keys has the same bytes as {@code b[start, end)} (no escapes here: same bytes, same key). */
    private boolean repeated(byte[] b, int start, int end, int others) {
        int len = end - start;
        for (int k = 0; k < others; k++) {
            if (otherEnds[k] - otherStarts[k] == len && Arrays.equals(b, otherStarts[k], otherEnds[k], b, start, end)) {
                return true;
            }
        }
        return false;
    }

    /** The first mapped field whose name is {@code b[start, end)} (followed by its quote), or -1. */
    private int field(byte[] b, int start, int end) {
        for (int f = 0; f < names.length; f++) {
            if (names[f].length() == end - start && names[f].at(b, start, end + 1)) {
                return f;
            }
        }
        return -1;
    }

    /**
     * Reads the value at {@code i} into kind, valueStart, valueEnd (and longValue); false when it
     * is not a plain value. A study id is first compared with the configured ones.
     */
    private boolean value(byte[] b, int i, int field) {
        if (i >= limit) {
            return false;
        }
        valueStart = i;
        byte c = b[i];
        if (c == '"') {
            kind = STRING;
            if (field == STUDY && knownStudy(b, i + 1)) {
                valueEnd = i + 2 + studies[studyIndex].length();
                return true;
            }
            int end = stringEnd(b, i + 1);
            valueEnd = end + 1;
            return end >= 0;
        }
        if (c == '-' || (c >= '0' && c <= '9')) {
            return number(b, i);
        }
        if (c == 't') {
            kind = TRUE;
            return literal(b, i, "true");
        }
        if (c == 'f') {
            kind = FALSE;
            return literal(b, i, "false");
        }
        if (c == 'n') {
            kind = NULL;
            return literal(b, i, "null");
        }
        return false;
    }

    /** Whether a configured study id (the last one seen first) and its quote stand at {@code at}; sets study and studyIndex. */
    private boolean knownStudy(byte[] b, int at) {
        int n = limit;
        if (lastStudy < studies.length && studies[lastStudy].at(b, at, n)) {
            studyIndex = lastStudy;
        } else {
            for (int k = 0; k < studies.length && studyIndex < 0; k++) {
                if (studies[k].at(b, at, n)) {
                    studyIndex = k;
                }
            }
            if (studyIndex < 0) {
                return false;
            }
            lastStudy = studyIndex;
        }
        study = studies[studyIndex].text();
        return true;
    }

    private boolean literal(byte[] b, int i, String word) {
        int end = i + word.length();
        if (end > limit) {
            return false;
        }
        for (int k = 1; k < word.length(); k++) {
            if (b[i + k] != word.charAt(k)) {
                return false;
            }
        }
        valueEnd = end;
        return end == limit || delimits(b[end]);
    }

    /** JSON's number grammar; whole numbers of up to 18 digits also get longValue (read in the same pass). */
    private boolean number(byte[] b, int i) {
        int n = limit;
        int j = i;
        boolean negative = b[j] == '-';
        if (negative) {
            j++;
        }
        if (j >= n) {
            return false;
        }
        int digitsStart = j;
        long v = 0;
        if (b[j] == '0') {
            j++;
        } else if (b[j] >= '1' && b[j] <= '9') {
            // Eight digits at a time while there are eight (epoch milliseconds have 13), then one at a time.
            long eight;
            while (j + 8 <= n && (eight = eightDigits((long) QuotedText.LONGS.get(b, j))) >= 0) {
                v = v * 100_000_000 + eight; // wraps beyond 18 digits, where it is not used
                j += 8;
            }
            while (j < n && b[j] >= '0' && b[j] <= '9') {
                v = v * 10 + (b[j] - '0');
                j++;
            }
        } else {
            return false;
        }
        int intDigits = j - digitsStart;
        kind = INT;
        if (j < n && b[j] == '.') {
            j++;
            int fraction = j;
            while (j < n && b[j] >= '0' && b[j] <= '9') {
                j++;
            }
            if (j == fraction) {
                return false;
            }
            kind = FLOAT;
        }
        if (j < n && (b[j] == 'e' || b[j] == 'E')) {
            j++;
            if (j < n && (b[j] == '+' || b[j] == '-')) {
                j++;
            }
            int exponent = j;
            while (j < n && b[j] >= '0' && b[j] <= '9') {
                j++;
            }
            if (j == exponent) {
                return false;
            }
            kind = FLOAT;
        }
        valueEnd = j;
        if (j - i > MAX_NUMBER_LENGTH || j >= n || !delimits(b[j])) {
            return false;
        }
        if (kind == INT) {
            if (intDigits > 18) {
                return false; // Jackson decides what a very long whole number becomes
            }
            longValue = negative ? -v : v;
        }
        return true;
    }

    /**
     * The value of eight ASCII digits read as a little-endian word (the first digit in the lowest
     * byte), or -1 when one of them is no digit: pairs, then quadruples, then the eight are
     * combined by multiplications (a known SWAR technique; common practice, no source).
     */
    private static long eightDigits(long x) {
        // A digit is a byte 0x30-0x3F (high half 3) that stays below 0x40 when 6 is added (at most '9').
        if ((x & 0xF0F0F0F0F0F0F0F0L) != 0x3030303030303030L
                || ((x + 0x0606060606060606L) & 0xF0F0F0F0F0F0F0F0L) != 0x3030303030303030L) {
            return -1;
        }
        long low = x - 0x3030303030303030L; // each byte its digit's value
        low = (low * 10 + (low >>> 8)) & 0x00FF00FF00FF00FFL;
        low = (low * 100 + (low >>> 16)) & 0x0000FFFF0000FFFFL;
        return (low * 10_000 + (low >>> 32)) & 0xFFFFFFFFL;
    }

    /**
     * The decimal number just read as the nearest double, as {@link Double#parseDouble} (and so
     * Jackson's fast double parser) gives it: exactly when mantissa and power of ten are both
     * exact doubles (one correctly rounded operation; Clinger 1990), else by parseDouble.
     */
    private double floatValue(byte[] b) {
        int j = valueStart;
        boolean negative = b[j] == '-';
        if (negative) {
            j++;
        }
        long mantissa = 0;
        int digits = 0;
        int scale = 0;
        boolean fraction = false;
        for (; j < valueEnd; j++) {
            byte c = b[j];
            if (c == '.') {
                fraction = true;
            } else if (c == 'e' || c == 'E') {
                break;
            } else {
                if (mantissa != 0 || c != '0') {
                    digits++;
                }
                mantissa = digits > 18 ? mantissa : mantissa * 10 + (c - '0');
                scale -= fraction ? 1 : 0;
            }
        }
        int exponent = 0;
        if (j < valueEnd) {
            j++;
            boolean minus = b[j] == '-';
            if (b[j] == '+' || b[j] == '-') {
                j++;
            }
            if (valueEnd - j > 4) {
                return slowDouble(b);
            }
            for (; j < valueEnd; j++) {
                exponent = exponent * 10 + (b[j] - '0');
            }
            exponent = minus ? -exponent : exponent;
        }
        int power = scale + exponent;
        if (digits > 18 || mantissa > EXACT_MANTISSA || power < -22 || power > 22) {
            return slowDouble(b);
        }
        double v = power < 0 ? mantissa / POWERS_OF_TEN[-power] : mantissa * POWERS_OF_TEN[power];
        return negative ? -v : v;
    }

    private double slowDouble(byte[] b) {
        return Double.parseDouble(new String(b, valueStart, valueEnd - valueStart, StandardCharsets.ISO_8859_1));
    }

    /** The string or number just read, as text (a string without its quotes). */
    private String text(byte[] b) {
        return kind == STRING ? texts.get(b, valueStart + 1, valueEnd - valueStart - 2) : texts.get(b, valueStart, valueEnd - valueStart);
    }

    /**
     * Index of the closing quote of a string of plain ASCII (no escapes, no control characters)
     * starting at {@code i}; else -1. Eight bytes at a time: the first byte that is a quote, a
     * backslash, below 0x20 or from 0x80 up decides.
     */
    private int stringEnd(byte[] b, int i) {
        int n = limit;
        for (; i + 8 <= n; i += 8) {
            long special = special((long) QuotedText.LONGS.get(b, i));
            if (special != 0) {
                int at = i + (Long.numberOfTrailingZeros(special) >>> 3);
                return b[at] == '"' ? at : -1;
            }
        }
        for (; i < n; i++) {
            byte c = b[i];
            if (c == '"') {
                return i;
            }
            if (c == '\\' || c < 0x20) { // bytes from 0x80 up are negative: left to Jackson as well
                return -1;
            }
        }
        return -1;
    }

    /**
     * The high bit of each byte of {@code x} that is a quote, a backslash, below 0x20 or from 0x80
     * up; bytes above the first such byte may be marked wrongly (a borrow carries upward), the
     * lowest mark is always right (the zero-byte test of Hacker's Delight, 2nd ed., section 6-1).
     */
    private static long special(long x) {
        long quote = x ^ 0x2222222222222222L;
        long backslash = x ^ 0x5C5C5C5C5C5C5C5CL;
        return ((quote - ONES) & ~quote | (backslash - ONES) & ~backslash | (x - 0x2020202020202020L) & ~x | x) & HIGH_BITS;
    }

    private static boolean delimits(byte c) {
        return c == ',' || c == '}' || isSpace(c);
    }

    /** JSON's whitespace; one compare for the usual bytes, which all lie above the space. */
    private static boolean isSpace(byte c) {
        return c <= ' ' && (c == ' ' || c == '\n' || c == '\r' || c == '\t');
    }

    private int skipSpace(byte[] b, int i) {
        while (i < limit && isSpace(b[i])) {
            i++;
        }
        return i;
    }
}
