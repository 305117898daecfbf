package dev.bracket.stream.publish;

import dev.bracket.config.WindowSpec;

import java.util.Arrays;
import java.util.List;

/**
 * The event-time span every time window shows at the current watermark, and whether a move of
 * the watermark changed any: the one way time alone changes a study's reports. Within a pane the
 * window's span stays put, so a study whose cells and late counts did not change would get the
 * same numbers again; only when a pane closes and the next opens (the span moves) do all studies
 * need new reports. Lets the bound updater recompute what changed rather than every study at
 * every watermark move. Cumulative windows have no span. Single-threaded.
 */
public final class WindowSpans {

    private final List<WindowSpec> windows;
    /** End of each window's span at the last watermark seen; {@link Long#MIN_VALUE} before the first. */
    private final long[] ends;

    public WindowSpans(List<WindowSpec> windows) {
        this.windows = windows.stream().filter(w -> w.kind() != WindowSpec.Kind.CUMULATIVE).toList();
        this.ends = new long[this.windows.size()];
        Arrays.fill(ends, Long.MIN_VALUE);
    }

    /**
     * Whether some window's span at {@code watermark} differs from its span at the previous call
     * (true at the first call when there are time windows). Spans as in {@link WindowReport#current}.
     */
    public boolean moved(long watermark) {
        boolean moved = false;
        for (int i = 0; i < ends.length; i++) {
            WindowSpec w = windows.get(i);
            long end = WindowReport.end(w, watermark);
            if (end != ends[i]) {
                ends[i] = end;
                moved = true;
            }
        }
        return moved;
    }
}
