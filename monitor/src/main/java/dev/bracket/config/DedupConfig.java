package dev.bracket.config;

import java.time.Duration;

/**
 * Deduplication by event {@code id}: an event whose (study, id) was already counted, within
 * {@code horizon} of event time before the partition's stream time, is rejected as a duplicate.
 * Each input partition remembers at most {@code maxIds} ids; beyond that the earliest counted is
 * forgotten first (and a later copy of it would count again).
 *
 * @param horizon how long (event time) an id is remembered; zero turns deduplication off
 * @param maxIds  most ids remembered per input partition
 */
public record DedupConfig(Duration horizon, int maxIds) {

    public static final DedupConfig DEFAULT = new DedupConfig(Duration.ofHours(24), 100_000);

    public boolean enabled() {
        return !horizon.isZero();
    }
}
