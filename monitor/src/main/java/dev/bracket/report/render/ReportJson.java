package dev.bracket.report.render;

import com.fasterxml.jackson.core.JsonGenerator;
import com.fasterxml.jackson.core.StreamWriteFeature;
import com.fasterxml.jackson.core.io.SerializedString;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.json.JsonMapper;
import com.fasterxml.jackson.databind.node.ObjectNode;
import com.fasterxml.jackson.databind.util.TokenBuffer;
import dev.bracket.bands.ConfidenceBand;
import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.BoundStatus;
import dev.bracket.bounds.IdentifiedInterval;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.report.BoundRow;
import dev.bracket.report.LostToFollowUp;
import dev.bracket.report.PendingOutcomes;
import dev.bracket.report.StudyReport;

import java.io.IOException;
import java.io.OutputStream;
import java.io.UncheckedIOException;
import java.util.Arrays;
import java.util.Map;

/**
 * The versioned JSON form of a {@link StudyReport}. Field names are a public contract:
 * automation depends on them. Numbers that do not exist (the ends of a refuted interval, the
 * mean of an empty arm) are {@code null}, never NaN.
 */
public final class ReportJson {

    /** Identifies the document layout; bump the number on incompatible changes. */
    public static final String SCHEMA = "bracket.bounds/2";

    /**
     * Doubles are written with Jackson's fast writer (Schubfach): the shortest digits that read
     * back as the same double, so a reader parses exactly the numbers Java's own formatting gave,
     * at a fraction of the cost (formatting was about a quarter of a publish).
     */
    private static final ObjectMapper MAPPER = JsonMapper.builder().enable(StreamWriteFeature.USE_FAST_DOUBLE_WRITER).build();
    private static final BoundedCache<String, SerializedString> FIXED_TEXTS = new BoundedCache<>(1024, SerializedString::new);

    private ReportJson() {
    }

    public static ObjectMapper mapper() {
        return MAPPER;
    }

    /** The whole report: schema, outcome range, pooled arms and one row per assumption set. */
    public static ObjectNode toJson(StudyReport report) {
        return tree(g -> {
            g.writeStartObject();
            g.writeStringField("schema", SCHEMA);
            writeFields(g, report);
            g.writeEndObject();
        });
    }

    /**
     * Writes the report's fields after the schema (outcome range, pooled arms, rows) into the
     * object {@code g} is in: documents are written straight to bytes, without a tree.
     */
    public static void writeFields(JsonGenerator g, StudyReport report) throws IOException {
        g.writeFieldName("outcome");
        outcome(g, report.range());
        g.writeFieldName("arms");
        arms(g, report);
        g.writeArrayFieldStart("bounds");
        boolean instrumentLevels = report.cells().hasInstrument();
        for (BoundRow row : report.rows()) {
            row(g, row, instrumentLevels);
        }
        g.writeEndArray();
    }

    /** Something written by a generator. */
    @FunctionalInterface
    public interface Writing {
        void to(JsonGenerator g) throws IOException;
    }

    /** What {@code writing} writes, as a tree (for callers that add to it). */
    public static ObjectNode tree(Writing writing) {
        try (TokenBuffer buffer = new TokenBuffer(MAPPER, false)) {
            writing.to(buffer);
            return MAPPER.readTree(buffer.asParser());
        } catch (IOException e) {
            throw new UncheckedIOException("cannot write a report into memory", e);
        }
    }

    /** What {@code writing} writes, as UTF-8 bytes. */
    public static byte[] bytes(Writing writing) {
        // One buffer per thread, reused: only the finished document is a new array.
        DocumentBuffer kept = BUFFER.get();
        DocumentBuffer out = kept.inUse ? new DocumentBuffer() : kept; // a document written while writing another
        out.reset();
        out.inUse = true;
        try (JsonGenerator g = MAPPER.getFactory().createGenerator(out)) {
            writing.to(g);
        } catch (IOException e) {
            throw new UncheckedIOException("cannot write a report into memory", e);
        } finally {
            out.inUse = false;
        }
        byte[] bytes = out.toByteArray();
        if (out == kept && out.capacity() > MAX_KEPT_BUFFER) {
            BUFFER.remove(); // a rare huge document should not pin its buffer
        }
        return bytes;
    }

    private static final ThreadLocal<DocumentBuffer> BUFFER = ThreadLocal.withInitial(DocumentBuffer::new);
    private static final int MAX_KEPT_BUFFER = 1 << 20;

    /** A byte buffer that can be emptied and refilled; the generator writes to it in large blocks, so plain methods suffice. */
    private static final class DocumentBuffer extends OutputStream {
        private byte[] bytes = new byte[16_384];
        private int length;
        private boolean inUse;

        void reset() {
            length = 0;
        }

        int capacity() {
            return bytes.length;
        }

        byte[] toByteArray() {
            return Arrays.copyOf(bytes, length);
        }

        @Override
        public void write(int b) {
            room(1);
            bytes[length++] = (byte) b;
        }

        @Override
        public void write(byte[] b, int off, int len) {
            room(len);
            System.arraycopy(b, off, bytes, length, len);
            length += len;
        }

        private void room(int more) {
            if (length + more > bytes.length) {
                bytes = Arrays.copyOf(bytes, Math.max(2 * bytes.length, length + more));
            }
        }
    }

    private static void outcome(JsonGenerator g, OutcomeRange range) throws IOException {
        g.writeStartObject();
        g.writeNumberField("min", range.min());
        g.writeNumberField("max", range.max());
        g.writeStringField("better", range.better().id());
        g.writeStringField("kind", range.kind().id());
        g.writeEndObject();
    }

    private static void arms(JsonGenerator g, StudyReport report) throws IOException {
        g.writeStartObject();
        g.writeFieldName("treated");
        arm(g, report.pooled().treated());
        g.writeFieldName("control");
        arm(g, report.pooled().control());
        number(g, "treatedShare", report.pooled().total() == 0 ? Double.NaN : report.pooled().treatedShare());
        boolean reported = PendingOutcomes.exposuresReported(report.pooled());
        g.writeBooleanField("exposuresReported", reported);
        if (reported) {
            g.writeStringField("pendingNote", PendingOutcomes.note(report.pooled()));
        } else {
            fixedText(g, PENDING_NOTE, PendingOutcomes.note(report.pooled())); // one sentence for every such study
        }
        g.writeEndObject();
    }

    /**
     * One arm: n (units with an outcome), mean and sd of those outcomes (null where they do not
     * exist), exposed units, pending units and their share of the arm's units.
     */
    public static ObjectNode arm(ArmStatistics s) {
        return tree(g -> arm(g, s));
    }

    private static void arm(JsonGenerator g, ArmStatistics s) throws IOException {
        g.writeStartObject();
        g.writeNumberField("n", s.count());
        number(g, "mean", s.isEmpty() ? Double.NaN : s.mean());
        number(g, "sd", s.count() < 2 ? Double.NaN : s.sd());
        g.writeNumberField("exposed", s.exposed());
        g.writeNumberField("pending", s.pending());
        number(g, "pendingShare", s.units() == 0 ? Double.NaN : (double) s.pending() / s.units());
        g.writeNumberField("excessOutcomes", s.excessOutcomes());
        g.writeEndObject();
    }

    /** Field names written many times per document (every row, band and stratum): encoded once. */
    private static final SerializedString ASSUMPTIONS = new SerializedString("assumptions");
    private static final SerializedString MEANING = new SerializedString("meaning");
    private static final SerializedString PENDING_OUTCOMES = new SerializedString("pendingOutcomes");
    private static final SerializedString INSTRUMENT = new SerializedString("instrument");
    private static final SerializedString SIGN = new SerializedString("sign");
    private static final SerializedString STRATA = new SerializedString("strata");
    private static final SerializedString STRATUM = new SerializedString("stratum");
    private static final SerializedString BANDS = new SerializedString("bands");
    private static final SerializedString METHOD = new SerializedString("method");
    private static final SerializedString LEVEL = new SerializedString("level");
    private static final SerializedString STATUS = new SerializedString("status");
    private static final SerializedString LOWER = new SerializedString("lower");
    private static final SerializedString UPPER = new SerializedString("upper");
    private static final SerializedString WIDTH = new SerializedString("width");
    private static final SerializedString EXCLUDES_ZERO = new SerializedString("excludesZero");
    private static final SerializedString BASIS = new SerializedString("basis");
    private static final SerializedString PENDING_NOTE = new SerializedString("pendingNote");

    /**
     * One row: assumptions, meaning, what it assumes about pending outcomes, the instrument assumption (null when the data have no
     * instrument levels), status, interval, width, sign, per-stratum intervals and any confidence bands.
     */
    private static void row(JsonGenerator g, BoundRow row, boolean instrumentLevels) throws IOException {
        g.writeStartObject();
        g.writeFieldName(ASSUMPTIONS);
        g.writeStartArray();
        for (String id : row.assumptions().ids()) {
            g.writeString(fixed(id));
        }
        g.writeEndArray();
        fixedText(g, MEANING, row.assumptions().meaning());
        fixedText(g, PENDING_OUTCOMES, PendingOutcomes.rowAssumption(row.assumptions()));
        if (instrumentLevels) {
            fixedText(g, INSTRUMENT, row.assumptions().instrument().id());
        } else {
            g.writeFieldName(INSTRUMENT);
            g.writeNull();
        }
        interval(g, row.interval());
        fixedText(g, SIGN, row.sign());
        if (!row.perStratum().isEmpty()) {
            g.writeFieldName(STRATA);
            g.writeStartArray();
            for (Map.Entry<String, IdentifiedInterval> e : row.perStratum().entrySet()) {
                g.writeStartObject();
                g.writeFieldName(STRATUM);
                g.writeString(e.getKey()); // names come from the data: too many to keep encoded
                interval(g, e.getValue());
                g.writeEndObject();
            }
            g.writeEndArray();
        }
        if (!row.shownBands().isEmpty()) {
            g.writeFieldName(BANDS);
            g.writeStartArray();
            for (ConfidenceBand b : row.shownBands()) {
                band(g, b);
            }
            g.writeEndArray();
        }
        g.writeEndObject();
    }

    /** A confidence band: method, level, status, ends, width, whether it excludes zero, sign, and what it rests on. */
    private static void band(JsonGenerator g, ConfidenceBand band) throws IOException {
        g.writeStartObject();
        fixedText(g, METHOD, band.method().id());
        g.writeFieldName(LEVEL);
        g.writeNumber(band.level());
        statusAndEnds(g, band.status(), band.lower(), band.upper(), band.width(), band.excludesZero());
        fixedText(g, SIGN, BoundRow.signWord(band.sign()));
        fixedText(g, BASIS, band.basis());
        g.writeEndObject();
    }

    private static void interval(JsonGenerator g, IdentifiedInterval iv) throws IOException {
        statusAndEnds(g, iv.status(), iv.lower(), iv.upper(), iv.width(), iv.excludesZero());
    }

    /** The fields an interval and a band share, in this order. */
    private static void statusAndEnds(JsonGenerator g, BoundStatus status, double lower, double upper, double width,
                                      boolean excludesZero) throws IOException {
        fixedText(g, STATUS, status.id());
        number(g, LOWER, lower);
        number(g, UPPER, upper);
        number(g, WIDTH, width);
        g.writeFieldName(EXCLUDES_ZERO);
        g.writeBoolean(excludesZero);
    }

    /**
     * A text from a small set (assumption meanings and identifiers, band descriptions, statuses,
     * signs): escaped and encoded once, then copied; long texts written afresh were a
     * good part of a document's cost.
     */
    public static void fixedText(JsonGenerator g, SerializedString field, String value) throws IOException {
        g.writeFieldName(field);
        g.writeString(fixed(value));
    }

    private static SerializedString fixed(String value) {
        return FIXED_TEXTS.get(value);
    }

    private static void number(JsonGenerator g, SerializedString field, double value) throws IOException {
        g.writeFieldName(field);
        if (Double.isFinite(value)) {
            g.writeNumber(value);
        } else {
            g.writeNull();
        }
    }

    /**
     * Writes {@code "lostToFollowUp"}: the horizon, the lost units per arm and their shares of the
     * arm's units ({@code treatedShare}, {@code controlShare}); null when {@code lost} is.
     */
    public static void lostToFollowUp(JsonGenerator g, LostToFollowUp lost, ObservedArms pooled) throws IOException {
        if (lost == null) {
            g.writeNullField("lostToFollowUp");
            return;
        }
        g.writeObjectFieldStart("lostToFollowUp");
        g.writeStringField("horizon", lost.horizon().toString());
        g.writeNumberField("treated", lost.treated());
        g.writeNumberField("control", lost.control());
        number(g, "treatedShare", lost.share(true, pooled.treated()));
        number(g, "controlShare", lost.share(false, pooled.control()));
        g.writeEndObject();
    }

    /** Writes a number, or null where it does not exist. */
    public static void number(JsonGenerator g, String field, double value) throws IOException {
        if (Double.isFinite(value)) {
            g.writeNumberField(field, value);
        } else {
            g.writeNullField(field);
        }
    }

    /** Writes an interval's status, ends, width and whether it excludes zero into {@code o}. */
    public static void interval(ObjectNode o, IdentifiedInterval iv) {
        o.setAll(tree(g -> {
            g.writeStartObject();
            interval(g, iv);
            g.writeEndObject();
        }));
    }

    /** Writes a number, or null where it does not exist. */
    public static void number(ObjectNode o, String field, double value) {
        if (Double.isFinite(value)) {
            o.put(field, value);
        } else {
            o.putNull(field);
        }
    }
}
