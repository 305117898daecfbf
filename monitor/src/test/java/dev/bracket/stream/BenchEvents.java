package dev.bracket.stream;

import java.nio.charset.StandardCharsets;
import java.util.Locale;
import java.util.SplittableRandom;

/**
 * Compact events (about 90 bytes of JSON) for the benchmark harnesses: 70% for study
 * "checkout" (0/1 outcome, epoch-millisecond time, no stratum), 30% for "registry" (outcome
 * in [-5, 5], two strata, two instrument levels), one second apart in event time. Invented
 * load, not data.
 */
public final class BenchEvents {

    public static final long START = 1_735_689_600_000L; // 2025-01-01T00:00:00Z

    /** The configuration's studies section for these events. */
    static final String STUDIES = """
            studies:
              - id: checkout
                outcome: {min: 0, max: 1, better: lower}
                assume: [[worst-case], [mts-negative]]
              - id: registry
                outcome: {min: -5, max: 5}
                assume: [[worst-case], [mtr-positive]]
            """;

    private final SplittableRandom rnd;

    BenchEvents(long seed) {
        rnd = new SplittableRandom(seed);
    }

    /** The {@code i}-th event's key (its unit) is written to {@code key[0]}; returns the value. */
    byte[] next(long i, byte[][] key) {
        String unit = "u" + rnd.nextInt(10_000);
        key[0] = unit.getBytes(StandardCharsets.UTF_8);
        long time = START + 1_000L * i;
        boolean treated = rnd.nextDouble() < 0.35;
        String json;
        if (rnd.nextDouble() < 0.7) {
            int y = rnd.nextDouble() < (treated ? 0.08 : 0.12) ? 1 : 0;
            json = "{\"study\":\"checkout\",\"unit\":\"" + unit + "\",\"treated\":" + treated + ",\"outcome\":" + y + ",\"time\":" + time + "}";
        } else {
            double y = Math.max(-5, Math.min(5, rnd.nextDouble() * 6 - 3 + (treated ? 0.4 : 0)));
            json = String.format(Locale.ROOT, "{\"study\":\"registry\",\"unit\":\"%s\",\"treated\":%d,\"outcome\":%.3f,\"time\":%d,\"stratum\":\"%s\",\"instrument\":\"z%d\"}",
                    unit, treated ? 1 : 0, y, time, rnd.nextBoolean() ? "a" : "b", rnd.nextInt(2));
        }
        return json.getBytes(StandardCharsets.UTF_8);
    }
}
