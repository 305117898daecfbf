package dev.bracket.stream;

import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.Random;

/**
 * Events for the streaming tests: a simulated stream with known structure (seeded), mixed with
 * unusable events of every kind. Not realistic data; it only exercises the plumbing.
 */
public final class TestEvents {

    /** One event as bytes, its routing key, and what the monitor should do with it. */
    public record Event(byte[] key, byte[] value, String study, boolean treated, double outcome, String rejectReason) {
        boolean usable() {
            return rejectReason == null;
        }
    }

    static final long START = 1_735_689_600_000L; // 2025-01-01T00:00:00Z

    private TestEvents() {
    }

    /**
     * {@code valid} usable events in time order (one second apart, shuffled within five minutes)
     * for two studies — "checkout" in [0, 1] and "registry" in [-5, 5] with two strata and two
     * instrument levels — and an unusable event after every {@code badEvery}-th usable one.
     */
    public static List<Event> stream(int valid, int badEvery, long seed) {
        Random rnd = new Random(seed);
        List<Event> out = new ArrayList<>(valid + valid / Math.max(1, badEvery) + 1);
        int bad = 0;
        for (int i = 0; i < valid; i++) {
            String unit = "u" + rnd.nextInt(5_000);
            long time = START + 1_000L * i - rnd.nextInt(300_000);
            boolean treated = rnd.nextDouble() < 0.35;
            String json;
            String study;
            double y;
            if (rnd.nextBoolean()) {
                study = "checkout";
                y = rnd.nextDouble() < (treated ? 0.08 : 0.12) ? 1 : 0;
                json = String.format(Locale.ROOT, "{\"study\":\"checkout\",\"unit\":\"%s\",\"treated\":%s,\"outcome\":%s,\"time\":%d}",
                        unit, treated, y, time);
            } else {
                study = "registry";
                y = Math.max(-5, Math.min(5, rnd.nextGaussian() * 1.5 + (treated ? 0.4 : 0)));
                json = String.format(Locale.ROOT,
                        "{\"study\":\"registry\",\"unit\":\"%s\",\"treated\":%d,\"outcome\":%s,\"time\":\"%s\",\"stratum\":\"%s\",\"instrument\":\"%s\"}",
                        unit, treated ? 1 : 0, y, java.time.Instant.ofEpochMilli(time), rnd.nextBoolean() ? "site-a" : "site-b",
                        rnd.nextDouble() < 0.5 ? "z0" : "z1");
            }
            out.add(new Event(utf8(unit), utf8(json), study, treated, y, null));
            if (badEvery > 0 && i % badEvery == badEvery - 1) {
                out.add(bad(bad++, unit));
            }
        }
        return out;
    }

    /** Events a day older than the stream: late for every windowed pane, still counted cumulatively. */
    static List<Event> late(int count, long seed) {
        Random rnd = new Random(seed);
        List<Event> out = new ArrayList<>();
        for (int i = 0; i < count; i++) {
            String unit = "late" + i;
            boolean treated = rnd.nextBoolean();
            double y = treated ? 0 : 1;
            String json = String.format(Locale.ROOT, "{\"study\":\"checkout\",\"unit\":\"%s\",\"treated\":%s,\"outcome\":%s,\"time\":%d}",
                    unit, treated, y, START - 86_400_000L + i);
            out.add(new Event(utf8(unit), utf8(json), "checkout", treated, y, null));
        }
        return out;
    }

    private static Event bad(int n, String unit) {
        String head = "{\"id\":\"bad-" + n + "\",\"study\":";
        String[][] kinds = {
                {"bad-json", head + "\"checkout\",\"unit\":"},
                {"missing-field", head + "\"checkout\",\"unit\":\"" + unit + "\",\"treated\":true}"},
                {"wrong-type", head + "\"checkout\",\"unit\":\"" + unit + "\",\"treated\":\"maybe\",\"outcome\":1}"},
                {"unknown-study", head + "\"pricing\",\"unit\":\"" + unit + "\",\"treated\":true,\"outcome\":1}"},
                {"out-of-range", head + "\"checkout\",\"unit\":\"" + unit + "\",\"treated\":true,\"outcome\":" + (2 + n) + "}"},
                {"too-large", head + "\"checkout\",\"unit\":\"" + unit + "\",\"treated\":true,\"outcome\":1,\"pad\":\"" + "x".repeat(2_000) + "\"}"},
        };
        String[] k = kinds[n % kinds.length];
        return new Event(utf8(unit), utf8(k[1]), null, false, Double.NaN, k[0]);
    }

    static byte[] utf8(String s) {
        return s.getBytes(StandardCharsets.UTF_8);
    }
}
