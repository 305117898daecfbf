package dev.bracket.stream.ingest;

/** A study and window whose late events are counted together. */
public record LateKey(String study, String window) {
}
