package dev.bracket.stream;

import dev.bracket.stream.ingest.EventParser;
import dev.bracket.stream.ingest.ParsedEvent;
import dev.bracket.stream.ingest.PartitionState;
import dev.bracket.stream.ingest.RejectReason;
import dev.bracket.stream.ingest.SeenIds;
import dev.bracket.stream.ingest.SourcePartition;
import dev.bracket.stream.publish.MergedPartials;
import dev.bracket.stream.publish.WindowReport;
import dev.bracket.config.BracketConfig;
import dev.bracket.config.FieldMapping;
import dev.bracket.config.StudyConfig;
import dev.bracket.config.WindowSpec;
import dev.bracket.lines.JsonLines;

import java.io.IOException;
import java.io.InputStream;
import java.util.ArrayList;
import java.util.EnumMap;
import java.util.List;
import java.util.Map;
import java.util.SortedSet;
import java.util.TreeSet;

/**
 * The monitor's computation over files instead of topics: the same {@link EventParser},
 * {@link PartitionState} and {@link MergedPartials} as the live path. Each partition is read in
 * order from one or more inputs (files or standard input), one after the other, so lateness is
 * judged across them as the monitor judges it within one input partition. Events without a time
 * field get the time the replay started, and that time is also the clock for {@code max-clock-skew}:
 * historical files replay unchanged, while an event dated after the replay's start plus the skew
 * is rejected as {@code time-too-far-ahead}. Lines are split by {@link JsonLines}, as
 * {@code demo-producer --from-file} splits them; blank lines are not events.
 *
 * <p>Unlike the monitor, which reports the window holding the newest event, a replay reports
 * every window that holds events: all the hours of a day replayed, say.
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
    /** The event ids counted in the newest partition; null when deduplication is off. */
    private SeenIds seen;

    /**
     * @param fields       the field names of the events (those of one configured input topic)
     * @param keepRejected how many rejected lines to keep for reporting (all are counted)
     */
    public Replay(BracketConfig config, FieldMapping fields, int keepRejected, long startTime) {
        this.config = config;
        this.parser = EventParser.forInput(config, fields);
        this.keepRejected = keepRejected;
        this.startTime = startTime;
    }

    /** Reads one input of JSON lines to its end as one more source partition; lines split as {@link JsonLines} does. */
    public void read(String name, InputStream in) throws IOException {
        newPartition(name);
        readMore(name, in);
    }

    /** Starts another source partition; {@link #readMore} adds inputs to it in order. */
    public void newPartition(String name) {
        sources.add(new PartitionState(new SourcePartition(name, sources.size()), config.windows(),
                config.grace().toMillis(), (s, w) -> { }));
        // Each partition is deduplicated by id on its own, as the monitor does each input partition.
        seen = config.dedup().enabled() ? new SeenIds(config.dedup()) : null;
    }

    /** Reads one input to its end as the continuation of the newest source partition. */
    public void readMore(String name, InputStream in) throws IOException {
        if (sources.isEmpty()) {
            throw new IllegalStateException("no partition started");
        }
        PartitionState state = sources.get(sources.size() - 1);
        JsonLines lines = new JsonLines(in);
        for (JsonLines.Line line = lines.next(); line != null; line = lines.next()) {
            accept(state, name, line.number(), line.bytes());
        }
    }

    private void accept(PartitionState state, String name, long lineNo, byte[] bytes) {
        ParsedEvent e = parser.parse(bytes, startTime);
        if (seen != null) {
            seen.check(e, state.streamTime());
        }
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

    /**
     * The reports of every study and window over all inputs read so far: the cumulative window
     * once, and each windowed one for every window end that has events (a sliding window's
     * every position), in time order.
     */
    public Result finish() {
        MergedPartials merged = new MergedPartials();
        for (PartitionState s : sources) {
            s.panes().forEach((k, arms) -> merged.pane(s.source(), k, arms));
            merged.progress(s.source(), s.progress());
        }
        List<WindowReport> reports = new ArrayList<>();
        for (StudyConfig study : config.studies()) {
            for (WindowSpec w : config.windows()) {
                if (w.kind() == WindowSpec.Kind.CUMULATIVE) {
                    reports.add(WindowReport.current(study, w, merged, config.bands()));
                    continue;
                }
                SortedSet<Long> ends = new TreeSet<>();
                for (long pane : merged.paneStarts(study.id(), w.name())) {
                    for (long end = pane + w.paneMillis(); end <= pane + w.size().toMillis(); end += w.paneMillis()) {
                        ends.add(end);
                    }
                }
                ends.forEach(end -> reports.add(WindowReport.ending(study, w, end, merged, config.bands())));
            }
        }
        return new Result(reports, accepted, new EnumMap<>(rejectedByReason), List.copyOf(rejected));
    }
}
