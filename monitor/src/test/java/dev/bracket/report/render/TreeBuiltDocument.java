package dev.bracket.report.render;

import com.fasterxml.jackson.databind.node.ArrayNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import dev.bracket.bands.ConfidenceBand;
import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.IdentifiedInterval;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.config.WindowSpec;
import dev.bracket.report.BoundRow;
import dev.bracket.report.PendingOutcomes;
import dev.bracket.report.StudyReport;
import dev.bracket.stream.publish.ReportDocument;
import dev.bracket.stream.publish.WindowReport;

import java.time.Instant;
import java.util.TreeMap;

/**
 * The bound document as built before the streaming writer: a tree of Jackson nodes, frozen here
 * (from commit 6cc2b2a, with the pending-outcome fields as the tree builder of the pending-outcomes
 * branch wrote them) as the reference the streaming writer must equal byte for byte.
 */
final class TreeBuiltDocument {

    private TreeBuiltDocument() {
    }

    static ObjectNode document(WindowReport r, long revision, Instant computedAt) {
        ObjectNode o = ReportJson.mapper().createObjectNode();
        ObjectNode body = report(r.report());
        o.set("schema", body.remove("schema"));
        o.put("study", r.study().id());
        o.put("window", r.window().name());
        o.put("windowKind", r.window().kind().name().toLowerCase(java.util.Locale.ROOT));
        if (r.window().kind() == WindowSpec.Kind.CUMULATIVE) {
            o.putNull("windowStart");
            o.putNull("windowEnd");
        } else {
            o.put("windowStart", Instant.ofEpochMilli(r.start()).toString());
            o.put("windowEnd", Instant.ofEpochMilli(r.end()).toString());
        }
        o.put("lateEvents", r.lateEvents());
        if (r.lost() == null) {
            o.putNull("lostToFollowUp");
        } else {
            ObjectNode lost = o.putObject("lostToFollowUp");
            lost.put("horizon", r.lost().horizon().toString());
            lost.put("treated", r.lost().treated());
            lost.put("control", r.lost().control());
            long treatedUnits = r.report().pooled().treated().units();
            long controlUnits = r.report().pooled().control().units();
            number(lost, "treatedShare", treatedUnits == 0 ? Double.NaN : (double) r.lost().treated() / treatedUnits);
            number(lost, "controlShare", controlUnits == 0 ? Double.NaN : (double) r.lost().control() / controlUnits);
        }
        o.put("revision", revision);
        if (computedAt != null) {
            o.put("computedAt", computedAt.toString());
        }
        o.setAll(body);
        o.put("caution", ReportDocument.CAUTION);
        return o;
    }

    /** The whole report: schema, outcome range, pooled arms and one row per assumption set. */
    static ObjectNode report(StudyReport report) {
        ObjectNode root = ReportJson.mapper().createObjectNode();
        root.put("schema", ReportJson.SCHEMA);
        root.set("outcome", outcome(report.range()));
        root.set("arms", arms(report));
        ArrayNode bounds = root.putArray("bounds");
        boolean instrumentLevels = report.cells().hasInstrument();
        report.rows().forEach(row -> bounds.add(row(row, instrumentLevels)));
        return root;
    }

    static ObjectNode outcome(OutcomeRange range) {
        ObjectNode o = ReportJson.mapper().createObjectNode();
        o.put("min", range.min());
        o.put("max", range.max());
        o.put("better", range.better().id());
        o.put("kind", range.kind().id());
        return o;
    }

    static ObjectNode arms(StudyReport report) {
        ObjectNode o = ReportJson.mapper().createObjectNode();
        o.set("treated", arm(report.pooled().treated()));
        o.set("control", arm(report.pooled().control()));
        number(o, "treatedShare", report.pooled().total() == 0 ? Double.NaN : report.pooled().treatedShare());
        o.put("exposuresReported", PendingOutcomes.exposuresReported(report.pooled()));
        o.put("pendingNote", PendingOutcomes.note(report.pooled()));
        return o;
    }

    /**
     * One arm: n (units with an outcome), mean and sd of those outcomes (null where they do not
     * exist), exposed units, pending units and their share of the arm's units.
     */
    static ObjectNode arm(ArmStatistics s) {
        ObjectNode o = ReportJson.mapper().createObjectNode();
        o.put("n", s.count());
        number(o, "mean", s.isEmpty() ? Double.NaN : s.mean());
        number(o, "sd", s.count() < 2 ? Double.NaN : s.sd());
        o.put("exposed", s.exposed());
        o.put("pending", s.pending());
        number(o, "pendingShare", s.units() == 0 ? Double.NaN : (double) s.pending() / s.units());
        o.put("excessOutcomes", s.excessOutcomes());
        return o;
    }

    /**
     * One row: assumptions, meaning, what it assumes about pending outcomes, the instrument assumption (null when the data have no
     * instrument levels), status, interval, width, sign, per-stratum intervals and any confidence bands.
     */
    static ObjectNode row(BoundRow row, boolean instrumentLevels) {
        ObjectNode o = ReportJson.mapper().createObjectNode();
        ArrayNode ids = o.putArray("assumptions");
        row.assumptions().ids().forEach(ids::add);
        o.put("meaning", row.assumptions().meaning());
        o.put("pendingOutcomes", PendingOutcomes.rowAssumption(row.assumptions()));
        if (instrumentLevels) {
            o.put("instrument", row.assumptions().instrument().id());
        } else {
            o.putNull("instrument");
        }
        interval(o, row.interval());
        o.put("sign", row.sign());
        if (!row.perStratum().isEmpty()) {
            ArrayNode strata = o.putArray("strata");
            new TreeMap<>(row.perStratum()).forEach((name, iv) -> {
                ObjectNode s = strata.addObject();
                s.put("stratum", name);
                interval(s, iv);
            });
        }
        if (!row.shownBands().isEmpty()) {
            ArrayNode bands = o.putArray("bands");
            row.shownBands().forEach(b -> bands.add(band(b)));
        }
        return o;
    }

    /** A confidence band: method, level, status, ends, width, whether it excludes zero, sign, and what it rests on. */
    static ObjectNode band(ConfidenceBand band) {
        ObjectNode o = ReportJson.mapper().createObjectNode();
        o.put("method", band.method().id());
        o.put("level", band.level());
        o.put("status", band.status().id());
        number(o, "lower", band.lower());
        number(o, "upper", band.upper());
        number(o, "width", band.width());
        o.put("excludesZero", band.excludesZero());
        o.put("sign", BoundRow.signWord(band.sign()));
        o.put("basis", band.basis());
        return o;
    }

    /** Writes an interval's status, ends, width and whether it excludes zero into {@code o}. */
    static void interval(ObjectNode o, IdentifiedInterval iv) {
        o.put("status", iv.status().id());
        number(o, "lower", iv.lower());
        number(o, "upper", iv.upper());
        number(o, "width", iv.width());
        o.put("excludesZero", iv.excludesZero());
    }

    /** Writes a number, or null where it does not exist. */
    static void number(ObjectNode o, String field, double value) {
        if (Double.isFinite(value)) {
            o.put(field, value);
        } else {
            o.putNull(field);
        }
    }
}
