package dev.bracket.bench;

import dev.bracket.config.DedupConfig;
import dev.bracket.stream.transaction.PartialsCodec;
import dev.bracket.stream.ingest.SeenIds;
import dev.bracket.stream.ingest.SourcePartition;

import java.lang.ref.Reference;
import java.time.Duration;
import java.util.Locale;

/**
 * The cost of deduplication by event id, without Kafka: (a) nanoseconds per event to look up and
 * remember a new id ({@link SeenIds#firstSighting}) and to encode the partials record that
 * carries it ({@link PartialsCodec#seenKey}, {@link PartialsCodec#seenValue}) — the aggregator's
 * added work per event with an id, besides sending that one extra record in the transaction;
 * (b) the same lookup for a repeated id; (c) heap bytes per remembered id, measured after full
 * collections with IDS ids held (ids like {@code "evt-000123456"}, one study). ROUNDS rounds, the
 * first ones warm the JIT. Run with a fixed heap and a stop-the-world collector for stable
 * numbers, e.g. {@code -Xms2g -Xmx2g -XX:+UseSerialGC}. Prints figures; asserts nothing; not part
 * of the test suite.
 *
 * <pre>
 * DedupBenchmark [IDS] [ROUNDS]
 * </pre>
 */
public final class DedupBenchmark {

    private DedupBenchmark() {
    }

    public static void main(String[] args) {
        int ids = args.length > 0 ? Integer.parseInt(args[0]) : 1_000_000;
        int rounds = args.length > 1 ? Integer.parseInt(args[1]) : 5;
        DedupConfig settings = new DedupConfig(Duration.ofHours(24), ids);
        SourcePartition source = new SourcePartition("events", 0);
        String[] names = new String[ids];
        for (int i = 0; i < ids; i++) {
            names[i] = String.format(Locale.ROOT, "evt-%09d", i);
        }
        long bytes = 0;
        for (int r = 1; r <= rounds; r++) {
            SeenIds seen = new SeenIds(settings);
            long t0 = System.nanoTime();
            for (int i = 0; i < ids; i++) {
                if (!seen.firstSighting("checkout", names[i], BenchEvents.START + i, BenchEvents.START + i)) {
                    throw new IllegalStateException("a new id was refused");
                }
            }
            long t1 = System.nanoTime();
            long[] size = new long[1];
            seen.forEachChange((key, time) -> size[0] += PartialsCodec.seenKey(source, key).length
                    + PartialsCodec.seenValue(time).length);
            long t2 = System.nanoTime();
            int repeats = 0;
            for (int i = 0; i < ids; i++) {
                repeats += seen.firstSighting("checkout", names[i], BenchEvents.START + i, BenchEvents.START + ids) ? 0 : 1;
            }
            long t3 = System.nanoTime();
            if (repeats != ids) {
                throw new IllegalStateException("a repeated id was counted");
            }
            bytes = size[0];
            System.out.printf(Locale.ROOT, "round %d: new id %.0f ns/event + its partials record encoded %.0f ns; repeated id %.0f ns%n",
                    r, (t1 - t0) / (double) ids, (t2 - t1) / (double) ids, (t3 - t2) / (double) ids);
        }
        System.out.printf(Locale.ROOT, "partials records for %,d ids: %,d bytes (%.0f bytes per id, key and value)%n",
                ids, bytes, (double) bytes / ids);

        long before = HeapInUse.afterGc();
        SeenIds held = new SeenIds(settings);
        for (int i = 0; i < ids; i++) {
            held.firstSighting("checkout", names[i], BenchEvents.START + i, BenchEvents.START + i);
        }
        held.markClean();
        long after = HeapInUse.afterGc();
        System.out.printf(Locale.ROOT, "heap: %,d ids held: %,d bytes, %.0f bytes per id (id strings made before the baseline)%n",
                ids, after - before, (double) (after - before) / ids);
        Reference.reachabilityFence(held);
        Reference.reachabilityFence(names);
    }
}
