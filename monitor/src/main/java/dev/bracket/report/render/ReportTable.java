package dev.bracket.report.render;

import dev.bracket.report.PendingOutcomes;

import dev.bracket.bands.ConfidenceBand;
import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.IdentifiedInterval;
import dev.bracket.bounds.OutcomeKind;
import dev.bracket.report.BoundRow;
import dev.bracket.report.Cautions;
import dev.bracket.report.StudyReport;

import java.util.LinkedHashSet;
import java.util.Locale;
import java.util.Map;
import java.util.Set;

/**
 * The human-readable form of a {@link StudyReport}: a fixed-width table (with any confidence bands
 * under their row) and, below it, the meanings of the assumptions and what the bands rest on.
 */
public final class ReportTable {

    private ReportTable() {
    }

    public static String render(StudyReport report) {
        StringBuilder out = new StringBuilder();
        out.append(String.format(Locale.ROOT, "Outcome range [%s, %s]%s, %s is better%n",
                num(report.range().min()), num(report.range().max()),
                report.range().kind() == OutcomeKind.BINARY ? " (binary: every outcome is one of the two ends)" : "",
                report.range().better().id()));
        out.append(armLine("treated", report.pooled().treated()));
        out.append(armLine("control", report.pooled().control()));
        out.append('\n');
        int width = report.rows().stream().mapToInt(r -> Math.max(r.assumptions().toString().length(),
                r.bands().stream().mapToInt(b -> bandLabel(b).length()).max().orElse(0))).max().orElse(10);
        width = Math.max(width, "assumptions".length());
        // With instrument levels, a column says which instrument assumption each row's bounds use.
        boolean instrumentLevels = report.cells().hasInstrument();
        String format = "%-" + width + "s  " + (instrumentLevels ? "%-16s  " : "%s") + "%-18s  %10s  %10s  %9s  %s%n";
        out.append(String.format(Locale.ROOT, format, "assumptions", instrumentLevels ? "instrument" : "", "status", "lower", "upper",
                "width", "sign of effect"));
        for (BoundRow row : report.rows()) {
            appendInterval(out, format, row.assumptions().toString(), instrumentLevels ? row.assumptions().instrument().id() : "",
                    row.interval(), row.sign());
            for (ConfidenceBand b : row.shownBands()) {
                appendBand(out, format, b);
            }
            for (Map.Entry<String, IdentifiedInterval> s : row.perStratum().entrySet()) { // sorted by name (BoundRow)
                appendInterval(out, format, "  stratum " + (s.getKey().isEmpty() ? "(none given)" : s.getKey()), "", s.getValue(), "");
            }
        }
        out.append('\n');
        for (BoundRow row : report.rows()) {
            out.append(String.format(Locale.ROOT, "%s: %s%n", row.assumptions(), row.assumptions().meaning()));
        }
        out.append(PendingOutcomes.note(report.pooled())).append(System.lineSeparator());
        if (instrumentLevels) {
            report.rows().stream().map(r -> r.assumptions().instrument()).distinct().forEach(i ->
                    out.append(String.format(Locale.ROOT, "instrument %s: %s%n", i.id(), i.meaning())));
        }
        appendBandNotes(out, report);
        out.append(System.lineSeparator()).append(Cautions.TEXT).append(System.lineSeparator());
        return out.toString();
    }

    private static void appendBand(StringBuilder out, String format, ConfidenceBand b) {
        boolean ok = b.isBounded();
        String signText = !ok ? "" : signText(BoundRow.signWord(b.sign()));
        out.append(String.format(Locale.ROOT, format, bandLabel(b), "", b.status().id(),
                ok ? num(b.lower()) : "-", ok ? num(b.upper()) : "-", ok ? num(b.width()) : "-", signText));
    }

    /** The sign column: the sign word, or a plain explanation when no sign is identified; blank for stratum lines. */
    private static String signText(String word) {
        return word.equals("undetermined") ? "not identified (contains 0)" : word;
    }

    private static String bandLabel(ConfidenceBand b) {
        return "  " + b.method().id() + " " + percent(b.level()) + " band";
    }

    /** What each kind of band rests on, once per distinct basis, and which one to act on. */
    private static void appendBandNotes(StringBuilder out, StudyReport report) {
        Set<String> notes = new LinkedHashSet<>();
        for (BoundRow row : report.rows()) {
            for (ConfidenceBand b : row.bands()) {
                notes.add(b.method().id() + " band: " + b.basis() + ".");
            }
        }
        if (notes.isEmpty()) {
            return;
        }
        out.append('\n');
        notes.forEach(n -> out.append(n).append(System.lineSeparator()));
        out.append("The fixed-horizon band holds for one look planned in advance; the anytime band stays valid however often")
                .append(System.lineSeparator())
                .append("the data are looked at, so decide and alert on the anytime band.")
                .append(System.lineSeparator());
    }

    /** A level as a percentage without trailing zeros, e.g. 95% or 99.5%. */
    private static String percent(double level) {
        return java.math.BigDecimal.valueOf(level * 100).setScale(6, java.math.RoundingMode.HALF_UP)
                .stripTrailingZeros().toPlainString() + "%";
    }

    private static void appendInterval(StringBuilder out, String format, String label, String instrument, IdentifiedInterval iv,
                                       String sign) {
        boolean ok = iv.isBounded();
        String signText = !ok ? "" : signText(sign);
        out.append(String.format(Locale.ROOT, format, label, instrument, iv.status().id(),
                ok ? num(iv.lower()) : "-", ok ? num(iv.upper()) : "-", ok ? num(iv.width()) : "-", signText));
    }

    private static String armLine(String name, ArmStatistics s) {
        return String.format(Locale.ROOT, "  %-8s n=%d%s%s%n", name, s.count(),
                s.isEmpty() ? "" : ", mean=" + num(s.mean()) + (s.m2() > 0 ? ", sd=" + num(s.sd()) : ""),
                s.exposed() == 0 ? "" : ", pending=" + s.pending() + " of " + s.units() + " exposed");
    }

    /** Six significant decimals, without trailing noise. */
    static String num(double v) {
        return String.format(Locale.ROOT, "%.6f", v);
    }
}
