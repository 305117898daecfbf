package dev.bracket.web;

import dev.bracket.bands.BandMethod;

import java.time.Instant;
import java.util.List;
import java.util.Optional;

/**
 * {@code GET /api/studies/{id}/history.csv}: a study's {@link ReportHistory} as one CSV row per
 * report and assumption set, for spreadsheets and notebooks. Columns:
 * {@code time,window,assumptions,status,lower,upper,fixed_level,fixed_lower,fixed_upper,anytime_level,anytime_lower,anytime_upper}.
 * {@code time} is ISO-8601 UTC; a number that does not exist (an interval or band that was not
 * computed, a band that was not configured) is an empty cell; numbers are written in full
 * precision ({@link Double#toString}).
 */
final class HistoryCsv {

    static final String HEADER = "time,window,assumptions,status,lower,upper,"
            + "fixed_level,fixed_lower,fixed_upper,anytime_level,anytime_lower,anytime_upper";

    private HistoryCsv() {
    }

    /** The CSV text, or empty for a study without history. */
    static Optional<String> of(ReportHistory history, String study) {
        List<ReportHistory.Series> all = history.study(study);
        if (all.isEmpty()) {
            return Optional.empty();
        }
        StringBuilder out = new StringBuilder(HEADER).append('\n');
        for (ReportHistory.Series s : all) {
            for (ReportHistory.Point p : s.points()) {
                out.append(Instant.ofEpochMilli(p.epochMillis())).append(',')
                        .append(quoted(s.key().window())).append(',')
                        .append(quoted(s.key().assumptions().toString())).append(',')
                        .append(p.status().id()).append(',')
                        .append(number(p.lower())).append(',').append(number(p.upper()));
                band(out, p, BandMethod.FIXED_HORIZON);
                band(out, p, BandMethod.ANYTIME);
                out.append('\n');
            }
        }
        return Optional.of(out.toString());
    }

    private static void band(StringBuilder out, ReportHistory.Point p, BandMethod method) {
        Optional<ReportHistory.BandEnds> ends = p.bands().stream().filter(b -> b.method() == method).findFirst();
        out.append(',').append(ends.map(b -> number(b.level())).orElse(""))
                .append(',').append(ends.map(b -> number(b.lower())).orElse(""))
                .append(',').append(ends.map(b -> number(b.upper())).orElse(""));
    }

    private static String number(double v) {
        return Double.isFinite(v) ? Double.toString(v) : "";
    }

    /** RFC 4180 quoting where a field holds a comma, quote or line break. */
    private static String quoted(String field) {
        if (field.indexOf(',') < 0 && field.indexOf('"') < 0 && field.indexOf('\n') < 0) {
            return field;
        }
        return '"' + field.replace("\"", "\"\"") + '"';
    }
}
