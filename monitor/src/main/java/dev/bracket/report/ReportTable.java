package dev.bracket.report;

import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.IdentifiedInterval;

import java.util.Locale;
import java.util.Map;
import java.util.TreeMap;

/** The human-readable form of a {@link StudyReport}: a fixed-width table and the meanings below it. */
public final class ReportTable {

    private ReportTable() {
    }

    public static String render(StudyReport report) {
        StringBuilder out = new StringBuilder();
        out.append(String.format(Locale.ROOT, "Outcome range [%s, %s], %s is better%n",
                num(report.range().min()), num(report.range().max()), report.range().better().id()));
        out.append(armLine("treated", report.pooled().treated()));
        out.append(armLine("control", report.pooled().control()));
        out.append('\n');
        int width = report.rows().stream().mapToInt(r -> r.assumptions().toString().length()).max().orElse(10);
        width = Math.max(width, "assumptions".length());
        String format = "%-" + width + "s  %-18s  %10s  %10s  %9s  %s%n";
        out.append(String.format(Locale.ROOT, format, "assumptions", "status", "lower", "upper", "width", "sign of effect"));
        for (BoundRow row : report.rows()) {
            appendInterval(out, format, row.assumptions().toString(), row.interval(), row.sign());
            for (Map.Entry<String, IdentifiedInterval> s : new TreeMap<>(row.perStratum()).entrySet()) {
                appendInterval(out, format, "  stratum " + s.getKey(), s.getValue(), "");
            }
        }
        out.append('\n');
        for (BoundRow row : report.rows()) {
            out.append(String.format(Locale.ROOT, "%s: %s%n", row.assumptions(), row.assumptions().meaning()));
        }
        return out.toString();
    }

    private static void appendInterval(StringBuilder out, String format, String label, IdentifiedInterval iv, String sign) {
        boolean ok = iv.isIdentified();
        String signText = !ok || sign.isEmpty() ? "" : sign.equals("undetermined") ? "not identified (contains 0)" : sign;
        out.append(String.format(Locale.ROOT, format, label, iv.status().id(),
                ok ? num(iv.lower()) : "-", ok ? num(iv.upper()) : "-", ok ? num(iv.width()) : "-", signText));
    }

    private static String armLine(String name, ArmStatistics s) {
        return String.format(Locale.ROOT, "  %-8s n=%d%s%n", name, s.count(),
                s.isEmpty() ? "" : ", mean=" + num(s.mean()) + (s.m2() > 0 ? ", sd=" + num(s.sd()) : ""));
    }

    /** Six significant decimals, without trailing noise. */
    static String num(double v) {
        return String.format(Locale.ROOT, "%.6f", v);
    }
}
