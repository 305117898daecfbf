package dev.bracket.config;

import java.time.Duration;

/**
 * A window over event time. Statistics are kept per pane: the whole stream for
 * {@link Kind#CUMULATIVE}, one pane per {@code size} for {@link Kind#TUMBLING}, and for
 * {@link Kind#SLIDING} panes of {@code step} of which the last {@code size / step} are merged
 * when a report is computed (so a sliding window costs no more state than a tumbling one).
 *
 * @param name the label in reports and documents
 * @param size the window's length (zero for cumulative)
 * @param step the pane length: {@code size} for tumbling, the slide for sliding, zero for cumulative
 */
public record WindowSpec(String name, Kind kind, Duration size, Duration step) {

    /** The window every study always has. */
    public static final WindowSpec CUMULATIVE = new WindowSpec("cumulative", Kind.CUMULATIVE, Duration.ZERO, Duration.ZERO);

    public enum Kind { CUMULATIVE, TUMBLING, SLIDING }

    /** Pane length in milliseconds; 0 for cumulative. */
    public long paneMillis() {
        return step.toMillis();
    }

    /** Start of the pane holding {@code eventTime}; 0 for cumulative. */
    public long paneStart(long eventTime) {
        return paneStart(eventTime, paneMillis());
    }

    /** Start of the pane of length {@code paneMillis} holding {@code eventTime}; 0 when the length is 0 (cumulative). */
    public static long paneStart(long eventTime, long paneMillis) {
        return paneMillis == 0 ? 0 : Math.floorDiv(eventTime, paneMillis) * paneMillis;
    }

    /** Number of panes merged into one report. */
    public int panesPerWindow() {
        return kind == Kind.SLIDING ? (int) (size.toMillis() / step.toMillis()) : 1;
    }
}
