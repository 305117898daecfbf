package dev.bracket.alerts.delivery;

import dev.bracket.alerts.AlertKey;
import dev.bracket.alerts.AlertState;
import dev.bracket.alerts.AlertTransition;
import dev.bracket.alerts.Evidence;
import dev.bracket.alerts.TransitionKind;
import dev.bracket.report.Cautions;
import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.node.ArrayNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.report.render.ReportJson;

import java.time.Duration;
import java.time.Instant;
import java.time.format.DateTimeParseException;
import java.util.List;
import java.util.Map;

/**
 * The versioned JSON document of an alert transition (schema {@value #SCHEMA}), as it goes to
 * the alerts topic, to webhooks and to {@code GET /api/alerts}. Field names are a public
 * contract. {@link #restoreState} reads back what a restart needs.
 */
public final class AlertJson {

    /** Identifies the document layout; bump the number on incompatible changes. */
    public static final String SCHEMA = "bracket.alert/2";

    private static final ObjectMapper MAPPER = ReportJson.mapper();

    private AlertJson() {
    }

    public static ObjectNode toJson(AlertTransition t) {
        ObjectNode o = MAPPER.createObjectNode();
        o.put("schema", SCHEMA);
        o.put("transitionId", t.transitionId());
        o.put("key", t.key().toString());
        o.put("study", t.key().study());
        boolean perRow = t.key().rule().perRow();
        o.put("scope", perRow ? "row" : "study");
        if (perRow) {
            ArrayNode ids = o.putArray("assumptions");
            AssumptionSet.parse(t.key().assumptions()).ids().forEach(ids::add);
            o.put("meaning", t.meaning());
            o.put("window", t.key().window());
        }
        o.put("rule", t.key().rule().id());
        o.put("state", t.kind().id());
        o.put("variant", t.variant());
        o.put("sequence", t.sequence());
        o.put("origin", t.origin().toString());
        o.put("at", t.at().toString());
        o.put("firingSince", t.firingSince().toString());
        o.put("summary", t.summary());
        o.set("evidence", evidence(t.evidence()));
        // A per-study alert (stalled stream, data quality) rests on no assumption: no cautions about them.
        ArrayNode cautions = o.putArray("cautions");
        if (perRow) {
            Cautions.ALL.forEach(cautions::add);
        }
        return o;
    }

    public static String toText(AlertTransition t) {
        try {
            return MAPPER.writeValueAsString(toJson(t));
        } catch (JsonProcessingException e) {
            throw new IllegalStateException("cannot write alert document", e);
        }
    }

    /** Identifies the layout of {@link #listing}. */
    public static final String LISTING_SCHEMA = "bracket.alerts/2";

    /**
     * The body of {@code GET /api/alerts}: the alerts firing now and the newest transitions
     * (each a full {@value #SCHEMA} document), per study when its last event arrived and how long
     * ago that was at {@code at} (the monitor's start stands in until one has), with the cautions.
     */
    public static ObjectNode listing(List<AlertState> firing, List<AlertTransition> newestFirst, Map<String, Instant> lastEvents,
                                     Instant at) {
        ObjectNode o = MAPPER.createObjectNode();
        o.put("schema", LISTING_SCHEMA);
        ArrayNode now = o.putArray("firing");
        for (AlertState s : firing) {
            ObjectNode f = now.addObject();
            f.put("key", s.key().toString());
            f.put("study", s.key().study());
            f.put("rule", s.key().rule().id());
            f.put("variant", s.variant());
            f.put("since", s.since().toString());
            f.put("sequence", s.sequence());
        }
        ArrayNode recent = o.putArray("recent");
        newestFirst.forEach(t -> recent.add(toJson(t)));
        ArrayNode studies = o.putArray("studies");
        lastEvents.forEach((study, last) -> {
            ObjectNode s = studies.addObject();
            s.put("study", study);
            s.put("lastEventAt", last.toString());
            s.put("silentForSeconds", seconds(Duration.between(last, at)));
        });
        ArrayNode cautions = o.putArray("cautions");
        Cautions.ALL.forEach(cautions::add);
        return o;
    }

    static ObjectNode evidence(Evidence evidence) {
        ObjectNode o = MAPPER.createObjectNode();
        if (evidence instanceof Evidence.OfBand b) {
            ObjectNode arms = o.putObject("arms");
            arms.set("treated", ReportJson.arm(b.arms().treated()));
            arms.set("control", ReportJson.arm(b.arms().control()));
            ReportJson.interval(o.putObject("interval"), b.interval());
            ObjectNode band = o.putObject("band");
            band.put("method", b.band().method().id());
            band.put("level", b.band().level());
            band.put("status", b.band().status().id());
            ReportJson.number(band, "lower", b.band().lower());
            ReportJson.number(band, "upper", b.band().upper());
            ReportJson.number(band, "width", b.band().width());
            band.put("basis", b.band().basis());
            ObjectNode limits = o.putObject("limits");
            b.limits().forEach(limits::put);
        } else if (evidence instanceof Evidence.OfSilence s) {
            o.put("lastEventAt", s.lastEventAt().toString());
            o.put("silentForSeconds", seconds(s.silentFor()));
            o.put("limitSeconds", seconds(s.limit()));
        } else if (evidence instanceof Evidence.OfQuality q) {
            o.put("periodSeconds", seconds(q.period()));
            o.put("accepted", q.accepted());
            o.put("rejected", q.rejected());
            o.put("outOfRange", q.outOfRange());
            o.put("unattributed", q.unattributed());
            o.put("rejectedShare", q.rejectedShare());
            o.put("maxRejectedShare", q.maxShare());
        }
        return o;
    }

    private static double seconds(Duration d) {
        return d.toMillis() / 1000.0;
    }

    /**
     * The state an alert document leaves its key in (see {@link AlertState#after}).
     *
     * @throws IllegalArgumentException naming the problem when the text is not a {@value #SCHEMA} document
     */
    public static AlertState restoreState(String text) {
        return document(text).state();
    }

    /**
     * Reads back an alert document as it was written.
     *
     * @throws IllegalArgumentException naming the problem when the text is not a {@value #SCHEMA} document
     */
    public static AlertDocument document(String text) {
        JsonNode o;
        try {
            o = MAPPER.readTree(text);
        } catch (JsonProcessingException e) {
            throw new IllegalArgumentException("not JSON: " + e.getOriginalMessage());
        }
        if (o == null || !SCHEMA.equals(o.path("schema").asText())) {
            throw new IllegalArgumentException("not a " + SCHEMA + " document (schema '" + (o == null ? "" : o.path("schema").asText()) + "')");
        }
        try {
            AlertKey key = AlertKey.parse(required(o, "key"));
            TransitionKind kind = TransitionKind.fromId(required(o, "state"));
            long sequence = o.path("sequence").asLong(0);
            Instant origin = Instant.parse(required(o, "origin"));
            String id = o.path("transitionId").isTextual() ? o.get("transitionId").asText()
                    : AlertTransition.idFor(key, origin, sequence);
            return new AlertDocument(id, key, kind, sequence, o.path("variant").asText(""), origin,
                    Instant.parse(required(o, "at")), text);
        } catch (DateTimeParseException e) {
            throw new IllegalArgumentException("bad time in alert document: " + e.getParsedString());
        }
    }

    private static String required(JsonNode o, String field) {
        JsonNode v = o.get(field);
        if (v == null || !v.isTextual()) {
            throw new IllegalArgumentException("alert document lacks text field '" + field + "'");
        }
        return v.asText();
    }
}
