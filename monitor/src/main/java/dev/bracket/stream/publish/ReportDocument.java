package dev.bracket.stream.publish;

import dev.bracket.report.Cautions;
import com.fasterxml.jackson.core.JsonGenerator;
import com.fasterxml.jackson.core.io.SerializedString;
import com.fasterxml.jackson.databind.node.ObjectNode;
import dev.bracket.config.WindowSpec;
import dev.bracket.report.render.BoundedCache;
import dev.bracket.report.render.ReportJson;

import java.io.IOException;
import java.time.Instant;
import java.util.Locale;

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

    private static final SerializedString CAUTION_FIELD = new SerializedString("caution");
    private static final BoundedCache<Instant, String> INSTANTS = new BoundedCache<>(256, Instant::toString);

    private ReportDocument() {
    }

    /**
     * @param revision   increases with every document the study's current owner wrote for the window (1 after a move)
     * @param computedAt when the numbers were computed; null leaves the field out (replay)
     */
    public static ObjectNode toJson(WindowReport r, long revision, Instant computedAt) {
        return ReportJson.tree(g -> write(g, r, revision, computedAt));
    }

    /** The same document as UTF-8 bytes, written without building a tree (what the bound updater publishes). */
    public static byte[] bytes(WindowReport r, long revision, Instant computedAt) {
        return ReportJson.bytes(g -> write(g, r, revision, computedAt));
    }

    private static void write(JsonGenerator g, WindowReport r, long revision, Instant computedAt) throws IOException {
        g.writeStartObject();
        g.writeStringField("schema", ReportJson.SCHEMA);
        g.writeStringField("study", r.study().id());
        g.writeStringField("window", r.window().name());
        g.writeStringField("windowKind", r.window().kind().name().toLowerCase(Locale.ROOT));
        if (r.window().kind() == WindowSpec.Kind.CUMULATIVE) {
            g.writeNullField("windowStart");
            g.writeNullField("windowEnd");
        } else {
            g.writeStringField("windowStart", text(Instant.ofEpochMilli(r.start())));
            g.writeStringField("windowEnd", text(Instant.ofEpochMilli(r.end())));
        }
        g.writeNumberField("lateEvents", r.lateEvents());
        ReportJson.lostToFollowUp(g, r.lost(), r.report().pooled());
        g.writeNumberField("revision", revision);
        if (computedAt != null) {
            g.writeStringField("computedAt", text(computedAt));
        }
        ReportJson.writeFields(g, r.report());
        ReportJson.fixedText(g, CAUTION_FIELD, CAUTION);
        g.writeEndObject();
    }

    /**
     * An instant as ISO-8601 text: a publish writes the same few instants (window ends, the time
     * of computation) into every study's documents, so they are formatted once.
     */
    private static String text(Instant instant) {
        return INSTANTS.get(instant);
    }
}
