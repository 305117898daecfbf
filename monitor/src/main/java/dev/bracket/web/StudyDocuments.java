package dev.bracket.web;

import com.fasterxml.jackson.databind.node.ArrayNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import dev.bracket.bands.BandMethod;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.report.store.LatestReports;
import dev.bracket.report.store.PublishedReport;
import dev.bracket.report.render.ReportJson;

import java.time.Instant;
import java.util.Comparator;
import java.util.List;
import java.util.Map;
import java.util.Optional;

/**
 * The JSON documents of the HTTP API. Like {@link ReportJson} their field names are a public
 * contract; each carries a {@code schema} name to bump on incompatible changes. A study's
 * report per window is embedded exactly as {@code bracket calc --json} prints it.
 */
public final class StudyDocuments {

    public static final String LIST_SCHEMA = "bracket.studies/2";
    public static final String STUDY_SCHEMA = "bracket.study/2";
    public static final String HISTORY_SCHEMA = "bracket.history/2";

    private StudyDocuments() {
    }

    /** {@code GET /api/studies}: every study with its windows, their counts and update times. */
    public static ObjectNode list(LatestReports latest) {
        ObjectNode root = ReportJson.mapper().createObjectNode();
        root.put("schema", LIST_SCHEMA);
        ArrayNode studies = root.putArray("studies");
        for (String study : latest.studies()) {
            List<PublishedReport> reports = latest.study(study);
            ObjectNode s = studies.addObject();
            s.put("study", study);
            s.put("updatedAt", updatedAt(reports).toString());
            ArrayNode windows = s.putArray("windows");
            for (PublishedReport r : reports) {
                window(windows, r);
            }
        }
        return root;
    }

    /**
     * {@code GET /api/studies/{id}}: per window, the counts, the units lost to follow-up (as in the
     * bounds topic's documents: null but for the cumulative window of a study with a follow-up
     * horizon) and the full bounds document; empty for an unknown study.
     */
    public static Optional<ObjectNode> study(LatestReports latest, String study) {
        List<PublishedReport> reports = latest.study(study);
        if (reports.isEmpty()) {
            return Optional.empty();
        }
        ObjectNode root = ReportJson.mapper().createObjectNode();
        root.put("schema", STUDY_SCHEMA);
        root.put("study", study);
        root.put("updatedAt", updatedAt(reports).toString());
        ArrayNode windows = root.putArray("windows");
        for (PublishedReport r : reports) {
            ObjectNode w = window(windows, r);
            w.setAll(ReportJson.tree(g -> {
                g.writeStartObject();
                ReportJson.lostToFollowUp(g, r.lost(), r.report().pooled());
                g.writeEndObject();
            }));
            w.set("report", ReportJson.toJson(r.report()));
        }
        return Optional.of(root);
    }

    /**
     * A window's entry in both documents: its name, the start and end of its current pane (null
     * for {@code cumulative}), when it was computed and its counts.
     */
    private static ObjectNode window(ArrayNode windows, PublishedReport r) {
        ObjectNode w = windows.addObject();
        w.put("window", r.window());
        instant(w, "windowStart", r.windowStart());
        instant(w, "windowEnd", r.windowEnd());
        w.put("computedAt", r.computedAt().toString());
        w.set("counts", counts(r));
        return w;
    }

    /**
     * {@code GET /api/studies/{id}/history}: one series per window and assumption set, as
     * columns ready for a chart: {@code time} (Unix seconds), {@code lower}, {@code upper}
     * (null where the interval was not identified) and {@code status}; and {@code bands}, one
     * entry per band method with {@code method}, {@code level}, {@code lower}, {@code upper}
     * columns (null where that band did not exist or was not identified).
     */
    public static Optional<ObjectNode> history(ReportHistory history, String study) {
        List<ReportHistory.Series> all = history.study(study);
        if (all.isEmpty()) {
            return Optional.empty();
        }
        ObjectNode root = ReportJson.mapper().createObjectNode();
        root.put("schema", HISTORY_SCHEMA);
        root.put("study", study);
        root.put("capacity", history.capacity());
        ArrayNode series = root.putArray("series");
        for (ReportHistory.Series s : all) {
            ObjectNode o = series.addObject();
            o.put("window", s.key().window());
            ArrayNode ids = o.putArray("assumptions");
            s.key().assumptions().ids().forEach(ids::add);
            o.put("meaning", s.key().assumptions().meaning());
            ArrayNode time = o.putArray("time");
            ArrayNode lower = o.putArray("lower");
            ArrayNode upper = o.putArray("upper");
            ArrayNode status = o.putArray("status");
            for (ReportHistory.Point p : s.points()) {
                time.add(p.epochMillis() / 1000.0);
                addNumber(lower, p.lower());
                addNumber(upper, p.upper());
                status.add(p.status().id());
            }
            ArrayNode bands = o.putArray("bands");
            s.points().stream().flatMap(p -> p.bands().stream())
                    .map(b -> Map.entry(b.method(), b.level())).distinct()
                    .forEach(kind -> bands.add(bandColumns(s.points(), kind.getKey(), kind.getValue())));
        }
        return Optional.of(root);
    }

    private static ObjectNode bandColumns(List<ReportHistory.Point> points, BandMethod method, double level) {
        ObjectNode b = ReportJson.mapper().createObjectNode();
        b.put("method", method.id());
        b.put("level", level);
        ArrayNode lower = b.putArray("lower");
        ArrayNode upper = b.putArray("upper");
        for (ReportHistory.Point p : points) {
            Optional<ReportHistory.BandEnds> ends = p.bands().stream()
                    .filter(e -> e.method() == method && e.level() == level).findFirst();
            addNumber(lower, ends.map(ReportHistory.BandEnds::lower).orElse(Double.NaN));
            addNumber(upper, ends.map(ReportHistory.BandEnds::upper).orElse(Double.NaN));
        }
        return b;
    }

    /** {@code {"error": message}} for 4xx answers. */
    public static ObjectNode error(String message) {
        ObjectNode o = ReportJson.mapper().createObjectNode();
        o.put("error", message);
        return o;
    }

    private static ObjectNode counts(PublishedReport r) {
        ObservedArms arms = r.report().pooled();
        ObjectNode c = ReportJson.mapper().createObjectNode();
        c.put("treated", arms.treated().count());
        c.put("control", arms.control().count());
        c.put("total", arms.total());
        c.put("pending", arms.pending());
        c.put("strata", r.report().cells().byStratum().size());
        return c;
    }

    private static Instant updatedAt(List<PublishedReport> reports) {
        return reports.stream().map(PublishedReport::computedAt).max(Comparator.naturalOrder()).orElseThrow();
    }

    private static void instant(ObjectNode o, String field, Instant at) {
        if (at == null) {
            o.putNull(field);
        } else {
            o.put(field, at.toString());
        }
    }

    private static void addNumber(ArrayNode array, double v) {
        if (Double.isFinite(v)) {
            array.add(v);
        } else {
            array.addNull();
        }
    }
}
