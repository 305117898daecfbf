package dev.bracket.stream.ingest;

import java.util.Map;

/**
 * How far one source partition has got in event time ({@code streamTime}: the largest event
 * time seen, {@link Long#MIN_VALUE} before any event), how many late events it counted per
 * study and window, its traffic per study, and how many of its rejected records named no study
 * that could be read ({@code unattributed}); the last two are cumulative, for the per-study alert rules.
 */
public record SourceProgress(long streamTime, Map<LateKey, Long> late, Map<String, StudyTraffic> traffic,
                             long unattributed) {

    public static final SourceProgress NONE = new SourceProgress(Long.MIN_VALUE, Map.of());

    public SourceProgress {
        late = Map.copyOf(late);
        traffic = Map.copyOf(traffic);
    }

    /** Progress without traffic counts. */
    public SourceProgress(long streamTime, Map<LateKey, Long> late) {
        this(streamTime, late, Map.of(), 0);
    }
}
