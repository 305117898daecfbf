package dev.bracket.stream.transaction;

import dev.bracket.stream.ingest.SeenIds;
import com.fasterxml.jackson.core.JsonGenerator;
import dev.bracket.stream.ingest.LateKey;
import dev.bracket.stream.ingest.PaneKey;
import dev.bracket.stream.ingest.SourcePartition;
import dev.bracket.stream.ingest.SourceProgress;
import dev.bracket.stream.ingest.StudyTraffic;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.node.ArrayNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.ObservedArms;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.util.HashMap;
import java.util.Map;

/**
 * Records of the compacted partials topic. Each key names one source partition and either one
 * pane or the partition's progress; the value is the CUMULATIVE state of that key (so
 * compaction keeps exactly what is needed) and {@code null} deletes a closed pane.
 *
 * <pre>
 * key   ["cell", topic, partition, study, stratum, level, window, paneStart]
 * value {"treated": {"n", "mean", "m2", "min", "max"[, "exposed"]}, "control": {...}}  ("exposed" absent = 0)
 * key   ["progress", topic, partition]
 * value {"streamTime": epochMillis|null, "late": [{"study", "window", "n"}],
 *        "traffic": [{"study", "accepted", "rejected", "outOfRange"}], "unattributed": n}
 *                                             (traffic and unattributed absent in older records)
 * key   ["seen", topic, partition, study, id]                  (added in format 2: deduplication by id)
 * value {"t": eventTimeMillis}
 * </pre>
 *
 * A "seen" record holds one event id the source partition has counted; {@code null} forgets it.
 * It is placed with its study's panes; the aggregators' restore reads every partials partition,
 * so it finds them there. Readers that do not restore ids (the bound updater) skip them through
 * the sink's default method; format 1 readers log them as unknown and go on.
 *
 * Doubles are written in Jackson's shortest round-trip form, so decoding gives back the same bits.
 *
 * <p>Placement: every pane record of one study goes to the partials partition chosen by the
 * study alone ({@link #partitionFor(String, int)}), so the member of the updater group that owns
 * that partition sees all of the study's numbers and nobody else does. A source's progress record
 * concerns every study, so it is written to every partials partition.
 */
public final class PartialsCodec {

    private static final ObjectMapper MAPPER = new ObjectMapper();

    /** Receives decoded records; {@code arms} is null for a deleted pane. */
    public interface Sink {
        void pane(SourcePartition source, PaneKey key, ObservedArms arms);

        void progress(SourcePartition source, SourceProgress progress);

        /** An event id the source partition counted at event time {@code time}; null: forgotten. */
        default void seen(SourcePartition source, SeenIds.Key key, Long time) {
        }
    }

    private PartialsCodec() {
    }

    /**
     * The partials partition holding every pane of {@code study}. Chosen here rather than by the
     * producer's default partitioner, whose hash of the whole key would scatter one study's panes;
     * String.hashCode is specified by the JDK, so every instance and version agrees.
     */
    public static int partitionFor(String study, int partitions) {
        return Math.floorMod(study.hashCode(), partitions);
    }

    public static byte[] paneKey(SourcePartition s, PaneKey k) {
        ArrayNode a = MAPPER.createArrayNode();
        a.add("cell").add(s.topic()).add(s.partition()).add(k.study()).add(k.stratum()).add(k.level()).add(k.window()).add(k.paneStart());
        return bytes(a);
    }

    public static byte[] progressKey(SourcePartition s) {
        return bytes(MAPPER.createArrayNode().add("progress").add(s.topic()).add(s.partition()));
    }

    /** Written with the streaming generator, not a tree: one of these goes with every event that has an id. */
    public static byte[] seenKey(SourcePartition s, SeenIds.Key k) {
        ByteArrayOutputStream out = new ByteArrayOutputStream(48 + k.id().length());
        try (JsonGenerator g = MAPPER.getFactory().createGenerator(out)) {
            g.writeStartArray();
            g.writeString("seen");
            g.writeString(s.topic());
            g.writeNumber(s.partition());
            g.writeString(k.study());
            g.writeString(k.id());
            g.writeEndArray();
        } catch (IOException e) {
            throw new IllegalStateException("cannot encode the key of id " + k, e);
        }
        return out.toByteArray();
    }

    /** Null (a tombstone) for a forgotten id. */
    public static byte[] seenValue(Long time) {
        return time == null ? null : ("{\"t\":" + time + "}").getBytes(StandardCharsets.US_ASCII);
    }

    public static byte[] paneValue(ObservedArms arms) {
        ObjectNode o = MAPPER.createObjectNode();
        o.set("treated", arm(arms.treated()));
        o.set("control", arm(arms.control()));
        return bytes(o);
    }

    public static byte[] progressValue(SourceProgress p) {
        ObjectNode o = MAPPER.createObjectNode();
        if (p.streamTime() == Long.MIN_VALUE) {
            o.putNull("streamTime");
        } else {
            o.put("streamTime", p.streamTime());
        }
        ArrayNode late = o.putArray("late");
        p.late().forEach((k, n) -> late.addObject().put("study", k.study()).put("window", k.window()).put("n", n));
        ArrayNode traffic = o.putArray("traffic");
        p.traffic().forEach((study, t) -> traffic.addObject().put("study", study)
                .put("accepted", t.accepted()).put("rejected", t.rejected()).put("outOfRange", t.outOfRange()));
        o.put("unattributed", p.unattributed());
        return bytes(o);
    }

    /** The source partition a key belongs to, or null when the key is not Bracket's. */
    public static SourcePartition sourceOf(byte[] key) {
        try {
            JsonNode k = MAPPER.readTree(key);
            return k != null && k.isArray() && k.size() >= 3 ? new SourcePartition(k.get(1).asText(), k.get(2).asInt()) : null;
        } catch (IOException e) {
            return null;
        }
    }

    /**
     * Decodes one record into {@code sink}.
     *
     * @throws IllegalArgumentException when the record is not a partials record of this format
     */
    public static void decode(byte[] key, byte[] value, Sink sink) {
        try {
            JsonNode k = MAPPER.readTree(key);
            if (k == null || !k.isArray() || k.size() < 3) {
                throw new IllegalArgumentException("not a partials key");
            }
            SourcePartition source = new SourcePartition(k.get(1).asText(), k.get(2).asInt());
            switch (k.get(0).asText()) {
                case "cell" -> { // the stored tag of a pane record, kept so existing partials topics restore
                    PaneKey pane = new PaneKey(k.get(3).asText(), k.get(4).asText(), k.get(5).asText(), k.get(6).asText(), k.get(7).asLong());
                    if (value == null) {
                        sink.pane(source, pane, null);
                    } else {
                        JsonNode v = MAPPER.readTree(value);
                        sink.pane(source, pane, new ObservedArms(arm(v.get("treated")), arm(v.get("control"))));
                    }
                }
                case "progress" -> {
                    if (value == null) {
                        sink.progress(source, SourceProgress.NONE);
                        return;
                    }
                    JsonNode v = MAPPER.readTree(value);
                    Map<LateKey, Long> late = new HashMap<>();
                    v.get("late").forEach(l -> late.put(new LateKey(l.get("study").asText(), l.get("window").asText()), l.get("n").asLong()));
                    Map<String, StudyTraffic> traffic = new HashMap<>();
                    JsonNode counted = v.get("traffic");
                    if (counted != null) {
                        counted.forEach(c -> traffic.put(c.get("study").asText(), new StudyTraffic(
                                c.get("accepted").asLong(), c.get("rejected").asLong(), c.get("outOfRange").asLong())));
                    }
                    JsonNode t = v.get("streamTime");
                    sink.progress(source, new SourceProgress(t == null || t.isNull() ? Long.MIN_VALUE : t.asLong(), late, traffic,
                            v.path("unattributed").asLong(0)));
                }
                case "seen" -> sink.seen(source, new SeenIds.Key(k.get(3).asText(), k.get(4).asText()),
                        value == null ? null : MAPPER.readTree(value).get("t").asLong());
                default -> throw new IllegalArgumentException("unknown partials record kind '" + k.get(0).asText() + "'");
            }
        } catch (IOException | RuntimeException e) {
            throw new IllegalArgumentException("unreadable partials record: " + e.getMessage(), e);
        }
    }

    private static ObjectNode arm(ArmStatistics s) {
        ObjectNode o = MAPPER.createObjectNode();
        o.put("n", s.count());
        o.put("mean", s.mean());
        o.put("m2", s.m2());
        putNumber(o, "min", s.min());
        putNumber(o, "max", s.max());
        if (s.exposed() > 0) {
            o.put("exposed", s.exposed()); // absent in partials written before exposures existed: read as 0
        }
        return o;
    }

    private static ArmStatistics arm(JsonNode o) {
        long n = o.get("n").asLong();
        long exposed = o.has("exposed") ? o.get("exposed").asLong() : 0;
        if (n == 0) {
            return ArmStatistics.empty().withExposures(exposed);
        }
        return new ArmStatistics(n, o.get("mean").asDouble(), o.get("m2").asDouble(), number(o.get("min")), number(o.get("max")),
                exposed);
    }

    private static void putNumber(ObjectNode o, String field, double v) {
        if (Double.isNaN(v)) {
            o.putNull(field);
        } else {
            o.put(field, v);
        }
    }

    private static double number(JsonNode n) {
        return n == null || n.isNull() ? Double.NaN : n.asDouble();
    }

    private static byte[] bytes(JsonNode n) {
        try {
            return MAPPER.writeValueAsBytes(n);
        } catch (IOException e) {
            throw new IllegalStateException("cannot encode " + n, e);
        }
    }
}
