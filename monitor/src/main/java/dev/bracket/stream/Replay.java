package dev.bracket.stream;

import dev.bracket.stream.ingest.EventParser;
import dev.bracket.stream.ingest.ParsedEvent;
import dev.bracket.stream.ingest.PartitionState;
import dev.bracket.stream.ingest.RejectReason;
import dev.bracket.stream.ingest.SourcePartition;
import dev.bracket.stream.publish.MergedPartials;
import dev.bracket.stream.publish.WindowReport;
import dev.bracket.config.BracketConfig;
import dev.bracket.config.FieldMapping;
import dev.bracket.config.StudyConfig;
import dev.bracket.config.WindowSpec;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.InputStream;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.EnumMap;
import java.util.List;
import java.util.Map;

/**
 * The monitor's computation over files instead of topics: the same {@link EventParser},
 * {@link PartitionState} and {@link MergedPartials} as the live path, with each input (file or
 * standard input) standing for one source partition read in order. Events without a time field
 * get the time the replay started. Blank lines are not events and are skipped.
 */
public final class Replay {

    /** A line that could not be used. */
    public record Rejected(String source, long line, RejectReason reason, String detail) {
    }

    /** Everything a replay found. */
    public record Result(List<WindowReport> reports, long accepted, Map<RejectReason, Long> rejectedByReason, List<Rejected> rejected) {

        public long rejectedTotal() {
            return rejectedByReason.values().stream().mapToLong(Long::longValue).sum();
        }
    }

    private final BracketConfig config;
    private final EventParser parser;
    private final long startTime;
    private final List<PartitionState> sources = new ArrayList<>();
    private final Map<RejectReason, Long> rejectedByReason = new EnumMap<>(RejectReason.class);
    private final List<Rejected> rejected = new ArrayList<>();
    private final int keepRejected;
    private long accepted;

    /**
     * @param fields       the field names of the events (those of one configured input topic)
     * @param keepRejected how many rejected lines to keep for reporting (all are counted)
     */
    public Replay(BracketConfig config, FieldMapping fields, int keepRejected, long startTime) {
        this.config = config;
        this.parser = new EventParser(config.studies(), fields, config.maxEventBytes());
        this.keepRejected = keepRejected;
        this.startTime = startTime;
    }

    /** Reads one input of JSON lines to its end as one more source partition. */
    public void read(String name, InputStream in) throws IOException {
        PartitionState state = new PartitionState(new SourcePartition(name, sources.size()), config.windows(),
                config.grace().toMillis(), (s, w) -> { });
        sources.add(state);
        byte[] buf = new byte[1 << 16];
        ByteArrayOutputStream line = new ByteArrayOutputStream();
        long lineNo = 0;
        int n;
        while ((n = in.read(buf)) > 0) {
            int from = 0;
            for (int i = 0; i < n; i++) {
                if (buf[i] == '\n') {
                    line.write(buf, from, i - from);
                    accept(state, name, ++lineNo, line.toByteArray());
                    line.reset();
                    from = i + 1;
                }
            }
            line.write(buf, from, n - from);
        }
        if (line.size() > 0) {
            accept(state, name, ++lineNo, line.toByteArray());
        }
    }

    private void accept(PartitionState state, String name, long lineNo, byte[] bytes) {
        int len = bytes.length;
        if (len > 0 && bytes[len - 1] == '\r') {
            len--;
        }
        if (isBlank(bytes, len)) {
            return;
        }
        ParsedEvent e = parser.parse(len == bytes.length ? bytes : Arrays.copyOf(bytes, len), startTime);
        if (e.isUsable()) {
            state.add(e);
            accepted++;
        } else {
            rejectedByReason.merge(e.rejection(), 1L, Long::sum);
            if (rejected.size() < keepRejected) {
                rejected.add(new Rejected(name, lineNo, e.rejection(), e.detail()));
            }
        }
    }

    private static boolean isBlank(byte[] b, int len) {
        for (int i = 0; i < len; i++) {
            if (b[i] != ' ' && b[i] != '\t') {
                return false;
            }
        }
        return true;
    }

    /** The reports of every study and window over all inputs read so far. */
    public Result finish() {
        MergedPartials merged = new MergedPartials();
        for (PartitionState s : sources) {
            s.panes().forEach((k, arms) -> merged.pane(s.source(), k, arms));
            merged.progress(s.source(), s.progress());
        }
        List<WindowReport> reports = new ArrayList<>();
        for (StudyConfig study : config.studies()) {
            for (WindowSpec w : config.windows()) {
                reports.add(WindowReport.current(study, w, merged, config.bands()));
            }
        }
        return new Result(reports, accepted, new EnumMap<>(rejectedByReason), List.copyOf(rejected));
    }
}
