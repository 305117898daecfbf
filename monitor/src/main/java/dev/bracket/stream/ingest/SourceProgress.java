package dev.bracket.stream.ingest;

import java.util.Map;

/**
 * How far one source partition has got in event time ({@code streamTime}: the largest event
 * time seen, {@link Long#MIN_VALUE} before any event) and how many late events it counted per
 * study and window.
 */
public record SourceProgress(long streamTime, Map<LateKey, Long> late) {

    public static final SourceProgress NONE = new SourceProgress(Long.MIN_VALUE, Map.of());

    public SourceProgress {
        late = Map.copyOf(late);
    }
}
