package dev.bracket.retry;

import java.time.Duration;
import java.util.random.RandomGenerator;

/**
 * Exponential backoff with jitter: the n-th retry (n = 1, 2, …) waits
 * {@code min(max, initial * 2^(n-1))} times a factor drawn uniformly from [0.8, 1.2], capped at
 * {@code max}. The jitter keeps several monitors from retrying against one receiver in lockstep
 * (common practice, no source for the 20%).
 */
public record Backoff(Duration initial, Duration max) {

    static final double JITTER = 0.2;

    public Backoff {
        if (initial == null || max == null || initial.isNegative() || initial.isZero() || max.compareTo(initial) < 0) {
            throw new IllegalArgumentException("backoff needs 0 < initial <= max (initial=" + initial + ", max=" + max + ")");
        }
    }

    /** The wait before retry number {@code retry} (1 for the first retry). */
    public Duration delay(int retry, RandomGenerator random) {
        if (retry < 1) {
            throw new IllegalArgumentException("retry numbers start at 1, was " + retry);
        }
        double nominal = Math.min(max.toMillis(), initial.toMillis() * Math.pow(2, Math.min(retry - 1, 40)));
        double jittered = nominal * (1 - JITTER + 2 * JITTER * random.nextDouble());
        return Duration.ofMillis(Math.round(Math.min(max.toMillis(), jittered)));
    }
}
