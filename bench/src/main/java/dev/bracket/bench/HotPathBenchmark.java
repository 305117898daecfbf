package dev.bracket.bench;

import com.fasterxml.jackson.core.JsonFactory;
import com.fasterxml.jackson.core.JsonParser;
import dev.bracket.config.BracketConfig;
import dev.bracket.stream.ingest.EventParser;
import dev.bracket.stream.ingest.ParsedEvent;
import dev.bracket.stream.ingest.PartitionState;
import dev.bracket.stream.ingest.SourcePartition;

import java.io.IOException;
import java.lang.management.ManagementFactory;
import java.util.Arrays;
import java.util.Locale;

/**
 * The aggregator's per-event work without Kafka, on EVENTS in-memory events from
 * {@link BenchEvents}: nanoseconds per event of (a) Jackson's streaming parser over all tokens
 * (the plain consumer's work), (b) {@link EventParser#parse}, (c) parse and fold into a
 * {@link PartitionState} with cumulative and hourly windows (and the bytes (c) allocates), in CPU time of the measuring thread
 * (so that other work on a shared machine moves the figures less). ROUNDS rounds; prints every
 * round, then the median of the second half (the first half warms the JIT). A guide for tuning the hot path; asserts nothing; not part of the
 * test suite.
 *
 * <pre>
 * HotPathBenchmark [EVENTS] [ROUNDS]
 * </pre>
 */
public final class HotPathBenchmark {

    private static final JsonFactory JSON = new JsonFactory();

    private HotPathBenchmark() {
    }

    public static void main(String[] args) throws IOException {
        int events = args.length > 0 ? Integer.parseInt(args[0]) : 1_000_000;
        int rounds = args.length > 1 ? Integer.parseInt(args[1]) : 8;
        BracketConfig config = BracketConfig.parse("hot.yaml", BenchEvents.STUDIES + """
                inputs:
                  - topic: events
                windows:
                  - {name: hourly, kind: tumbling, size: 1h}
                kafka:
                  bootstrap.servers: localhost:9
                """);
        BenchEvents gen = new BenchEvents(1);
        byte[][] key = new byte[1][];
        byte[][] values = new byte[events][];
        for (int i = 0; i < events; i++) {
            values[i] = gen.next(i, key);
        }
        EventParser parser = EventParser.forInput(config, config.inputs().get(0).fields());
        // As in the aggregator: the record timestamp and the clock are now, so the events' own times
        // (from 2025 on) pass the clock-skew check.
        long now = System.currentTimeMillis();
        com.sun.management.ThreadMXBean cpu = (com.sun.management.ThreadMXBean) ManagementFactory.getThreadMXBean();
        double[] jackson = new double[rounds];
        double[] parse = new double[rounds];
        double[] fold = new double[rounds];
        double[] allocated = new double[rounds];
        for (int r = 1; r <= rounds; r++) {
            long t0 = cpu.getCurrentThreadCpuTime();
            long tokens = 0;
            for (byte[] v : values) {
                try (JsonParser p = JSON.createParser(v)) {
                    while (p.nextToken() != null) {
                        tokens++;
                    }
                }
            }
            long t1 = cpu.getCurrentThreadCpuTime();
            long usable = 0;
            for (byte[] v : values) {
                usable += parser.parse(v, now, now).isUsable() ? 1 : 0;
            }
            long t2 = cpu.getCurrentThreadCpuTime();
            parse[r - 1] = (t2 - t1) / (double) events;
            PartitionState state = new PartitionState(new SourcePartition("events", 0), config.windows(), config.grace().toMillis(), (s, w) -> { });
            long bytes0 = cpu.getCurrentThreadAllocatedBytes();
            t2 = cpu.getCurrentThreadCpuTime();
            for (byte[] v : values) {
                ParsedEvent e = parser.parse(v, now, now);
                if (e.isUsable()) {
                    state.add(e);
                }
            }
            long t3 = cpu.getCurrentThreadCpuTime();
            allocated[r - 1] = (cpu.getCurrentThreadAllocatedBytes() - bytes0) / (double) events;
            if (tokens == 0 || usable != events || state.panes().isEmpty()) {
                throw new IllegalStateException("events not read as expected");
            }
            jackson[r - 1] = (t1 - t0) / (double) events;
            fold[r - 1] = (t3 - t2) / (double) events;
            System.out.printf(Locale.ROOT, "round %d: Jackson tokens %.0f ns/event; EventParser %.0f ns; parse + fold %.0f ns, %.1f bytes allocated%n",
                    r, jackson[r - 1], parse[r - 1], fold[r - 1], allocated[r - 1]);
        }
        int warm = rounds / 2; // the first half warms the JIT
        System.out.printf(Locale.ROOT, "median of rounds %d-%d: Jackson tokens %s ns/event; EventParser %s ns; parse + fold %s ns, %s bytes allocated%n",
                warm + 1, rounds, Stats.summary(Arrays.copyOfRange(jackson, warm, rounds), "%.0f"), Stats.summary(Arrays.copyOfRange(parse, warm, rounds), "%.0f"),
                Stats.summary(Arrays.copyOfRange(fold, warm, rounds), "%.0f"), Stats.summary(Arrays.copyOfRange(allocated, warm, rounds), "%.1f"));
    }
}
