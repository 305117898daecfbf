package dev.bracket.stream.ingest;

import java.time.Instant;
import java.time.OffsetDateTime;
import java.time.format.DateTimeParseException;

/**
 * Reads ISO-8601 date-times with an offset into epoch milliseconds, for years 1 to 9999 only
 * (the range of ISO-8601's four-digit years; further out, window arithmetic could overflow). The common shape
 * {@code YYYY-MM-DDTHH:MM:SS[.fraction](Z|+HH:MM|-HH:MM)} is read straight from the parser's
 * characters (java.time's formatter costs about a microsecond per event, more than the rest of
 * the parse); anything else goes to {@link OffsetDateTime#parse}.
 */
final class IsoTime {

    /** Returned when the text is not a date-time with an offset. */
    static final long INVALID = Long.MIN_VALUE;
    /** Returned for a date-time outside {@link #FIRST_MILLIS} to {@link #LAST_MILLIS}. */
    static final long UNREPRESENTABLE = Long.MIN_VALUE + 1;
    /** 0001-01-01T00:00:00Z. */
    static final long FIRST_MILLIS = -62_135_596_800_000L;
    /** 9999-12-31T23:59:59.999Z. */
    static final long LAST_MILLIS = 253_402_300_799_999L;

    private IsoTime() {
    }

    /** @return epoch milliseconds, {@link #INVALID} or {@link #UNREPRESENTABLE}; never throws */
    static long parseMillis(char[] c, int off, int len) {
        long fast = fast(c, off, len);
        long millis = fast != INVALID ? fast : slow(new String(c, off, len));
        return millis == INVALID || representable(millis) ? millis : UNREPRESENTABLE;
    }

    /** Whether epoch milliseconds lie in years 1 to 9999. */
    static boolean representable(long millis) {
        return millis >= FIRST_MILLIS && millis <= LAST_MILLIS;
    }

    private static long fast(char[] c, int o, int len) {
        if (len < 20 || c[o + 4] != '-' || c[o + 7] != '-' || (c[o + 10] != 'T') || c[o + 13] != ':' || c[o + 16] != ':') {
            return INVALID;
        }
        int year = digits(c, o, 4);
        int month = digits(c, o + 5, 2);
        int day = digits(c, o + 8, 2);
        int hour = digits(c, o + 11, 2);
        int minute = digits(c, o + 14, 2);
        int second = digits(c, o + 17, 2);
        if (year < 0 || month < 1 || month > 12 || day < 1 || day > daysInMonth(year, month)
                || hour < 0 || hour > 23 || minute < 0 || minute > 59 || second < 0 || second > 59) {
            return INVALID;
        }
        int i = o + 19;
        int end = o + len;
        long millis = 0;
        if (i < end && c[i] == '.') {
            int scale = 100;
            i++;
            int start = i;
            while (i < end && c[i] >= '0' && c[i] <= '9') {
                millis += (c[i] - '0') * scale; // digits past milliseconds are truncated, as Instant#toEpochMilli does
                scale /= 10;
                i++;
            }
            if (i == start || i - start > 9) {
                return INVALID;
            }
        }
        long offsetSeconds;
        if (i == end - 1 && c[i] == 'Z') {
            offsetSeconds = 0;
        } else if (i == end - 6 && (c[i] == '+' || c[i] == '-') && c[i + 3] == ':') {
            int oh = digits(c, i + 1, 2);
            int om = digits(c, i + 4, 2);
            if (oh < 0 || oh > 18 || om < 0 || om > 59) {
                return INVALID;
            }
            offsetSeconds = (c[i] == '-' ? -1 : 1) * (oh * 3600L + om * 60L);
        } else {
            return INVALID;
        }
        long seconds = epochDay(year, month, day) * 86_400L + hour * 3600L + minute * 60L + second - offsetSeconds;
        return seconds * 1000 + millis;
    }

    private static long slow(String text) {
        Instant instant;
        try {
            instant = Instant.parse(text);
        } catch (DateTimeParseException e) {
            try {
                instant = OffsetDateTime.parse(text).toInstant();
            } catch (DateTimeParseException e2) {
                return INVALID;
            }
        }
        // Instant reaches year 1,000,000,000, far beyond a long of milliseconds.
        return instant.isBefore(Instant.ofEpochMilli(FIRST_MILLIS)) || instant.isAfter(Instant.ofEpochMilli(LAST_MILLIS))
                ? UNREPRESENTABLE : instant.toEpochMilli();
    }

    private static int digits(char[] c, int o, int n) {
        int v = 0;
        for (int k = 0; k < n; k++) {
            char ch = c[o + k];
            if (ch < '0' || ch > '9') {
                return -1;
            }
            v = v * 10 + (ch - '0');
        }
        return v;
    }

    private static int daysInMonth(int year, int month) {
        return switch (month) {
            case 2 -> (year % 4 == 0 && (year % 100 != 0 || year % 400 == 0)) ? 29 : 28;
            case 4, 6, 9, 11 -> 30;
            default -> 31;
        };
    }

    /** Days since 1970-01-01 of a proleptic Gregorian date (H. Hinnant, "chrono-compatible low-level date algorithms", days_from_civil). */
    private static long epochDay(int y, int m, int d) {
        y -= m <= 2 ? 1 : 0;
        long era = Math.floorDiv(y, 400);
        long yoe = y - era * 400;
        long doy = (153L * (m + (m > 2 ? -3 : 9)) + 2) / 5 + d - 1;
        long doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
        return era * 146_097 + doe - 719_468;
    }
}
