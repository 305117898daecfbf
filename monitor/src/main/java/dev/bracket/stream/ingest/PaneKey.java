package dev.bracket.stream.ingest;

/**
 * The key of one pane's statistics: study, stratum, instrument level, window and the start of the
 * window's pane in event time (0 for the cumulative window). Empty stratum or level means the
 * data carry none.
 */
public record PaneKey(String study, String stratum, String level, String window, long paneStart) {
}
