package dev.bracket.stream.publish;

import dev.bracket.report.Cautions;
import com.fasterxml.jackson.databind.node.ObjectNode;
import dev.bracket.config.WindowSpec;
import dev.bracket.report.render.ReportJson;

import java.time.Instant;

/**
 * The JSON document published to the bounds topic (and printed by {@code replay --json}) for
 * one study and window: where the numbers come from (study, window and its event-time span,
 * late events left out, revision, time of computation) followed by the {@link ReportJson}
 * fields (schema, outcome range, pooled arms with counts and means, one row per assumption set).
 * Field names are a public contract.
 */
public final class ReportDocument {

    /** Attached to every document: it reaches people through dashboards and alerts. */
    public static final String CAUTION = Cautions.TEXT;

    private ReportDocument() {
    }

    /**
     * @param revision   increases with every document the study's current owner wrote for the window (1 after a move)
     * @param computedAt when the numbers were computed; null leaves the field out (replay)
     */
    public static ObjectNode toJson(WindowReport r, long revision, Instant computedAt) {
        ObjectNode o = ReportJson.mapper().createObjectNode();
        ObjectNode body = ReportJson.toJson(r.report());
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
        o.put("revision", revision);
        if (computedAt != null) {
            o.put("computedAt", computedAt.toString());
        }
        o.setAll(body);
        o.put("caution", CAUTION);
        return o;
    }
}
