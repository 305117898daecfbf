package dev.bracket.bench;

import com.fasterxml.jackson.core.JsonFactory;
import com.fasterxml.jackson.core.JsonParser;
import dev.bracket.config.BracketConfig;
import dev.bracket.lines.JsonLines;
import dev.bracket.stream.Replay;

import java.io.BufferedOutputStream;
import java.io.IOException;
import java.io.InputStream;
import java.io.OutputStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Locale;

/**
 * Throughput of {@code bracket replay} against reading the same file with nothing but a parser:
 * EVENTS events from {@link BenchEvents} in one JSON-lines file (on the temporary file system,
 * so mostly in the page cache); one uncounted warm-up round, then RUNS rounds of
 *
 * <ol>
 *   <li><b>parse only</b>: the same line splitter as replay, and Jackson's streaming parser over
 *       all tokens of every line;</li>
 *   <li><b>replay</b>: {@link Replay} reading the file as one partition and computing every
 *       window's reports (cumulative and every hourly pane: EVENTS / 3600 panes), as
 *       {@code bracket replay} does before printing.</li>
 * </ol>
 *
 * Prints events per second and their ratio per round, and the median; judges nothing; not part
 * of the test suite ({@code bench/run replay}).
 *
 * <pre>
 * ReplayBenchmark [EVENTS] [RUNS]
 * </pre>
 */
public final class ReplayBenchmark {

    private static final JsonFactory JSON = new JsonFactory();

    private ReplayBenchmark() {
    }

    public static void main(String[] args) throws Exception {
        int events = args.length > 0 ? Integer.parseInt(args[0]) : 1_000_000;
        int runs = args.length > 1 ? Integer.parseInt(args[1]) : 5;
        Path file = Files.createTempFile("bracket-replay-bench", ".jsonl");
        try {
            BenchEvents gen = new BenchEvents(1);
            byte[][] key = new byte[1][];
            try (OutputStream out = new BufferedOutputStream(Files.newOutputStream(file), 1 << 16)) {
                for (long i = 0; i < events; i++) {
                    out.write(gen.next(i, key));
                    out.write('\n');
                }
            }
            BracketConfig config = BracketConfig.parse("bench.yaml", BenchEvents.STUDIES + """
                    inputs:
                      - topic: bench-events
                    windows:
                      - {name: hourly, kind: tumbling, size: 1h}
                    """);
            System.out.printf(Locale.ROOT, "%,d events in one file of %,d bytes; windows cumulative and hourly%n", events, Files.size(file));
            System.out.printf(Locale.ROOT, "warm-up (not counted): parse only %,.0f/s; replay %,.0f/s%n",
                    parseOnly(file, events), replay(file, config, events));
            double[] parse = new double[runs];
            double[] replay = new double[runs];
            double[] ratio = new double[runs];
            for (int r = 0; r < runs; r++) {
                parse[r] = parseOnly(file, events);
                replay[r] = replay(file, config, events);
                ratio[r] = replay[r] / parse[r];
                System.out.printf(Locale.ROOT, "run %d: parse only %,.0f events/s; replay %,.0f/s; replay/parse %.2f%n", r + 1, parse[r], replay[r], ratio[r]);
            }
            System.out.println("over " + runs + " runs, median (min-max):");
            System.out.println("  parse only      " + Stats.summary(parse, "%,.0f") + " events/s");
            System.out.println("  replay          " + Stats.summary(replay, "%,.0f") + " events/s");
            System.out.println("  replay / parse  " + Stats.summary(ratio, "%.2f"));
        } finally {
            Files.deleteIfExists(file);
        }
    }

    private static double parseOnly(Path file, int events) throws IOException {
        long start = System.nanoTime();
        long lines = 0;
        long tokens = 0;
        try (InputStream in = Files.newInputStream(file); JsonLines split = new JsonLines(in)) {
            for (JsonLines.Line line = split.next(); line != null; line = split.next()) {
                try (JsonParser p = JSON.createParser(line.bytes())) {
                    while (p.nextToken() != null) {
                        tokens++;
                    }
                }
                lines++;
            }
        }
        double rate = lines / ((System.nanoTime() - start) / 1e9);
        if (lines != events || tokens < 10L * events) {
            throw new IllegalStateException("parsed " + lines + " lines, " + tokens + " tokens; expected " + events + " lines");
        }
        return rate;
    }

    private static double replay(Path file, BracketConfig config, int events) throws IOException {
        long start = System.nanoTime();
        Replay replay = new Replay(config, config.inputs().get(0).fields(), 0, System.currentTimeMillis());
        try (InputStream in = Files.newInputStream(file)) {
            replay.read(file.toString(), in);
        }
        Replay.Result result = replay.finish();
        double rate = events / ((System.nanoTime() - start) / 1e9);
        if (result.accepted() != events) {
            throw new IllegalStateException("replay accepted " + result.accepted() + " of " + events + " events");
        }
        return rate;
    }
}
