package dev.bracket.stream.ingest;

import dev.bracket.stream.publish.MergedPartials;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.config.StudyConfig;
import dev.bracket.config.WindowSpec;
import dev.bracket.bench.BenchEvents;
import dev.bracket.bench.HeapInUse;

import java.lang.ref.Reference;
import java.time.Duration;
import java.util.List;
import java.util.Locale;

/**
 * Heap bytes per cell, measured (not estimated): the heap in use after full collections with
 * CELLS cells held, minus the same with none, divided by CELLS. Two structures are measured:
 * the aggregator's {@link PartitionState} (one entry per cell of one source partition, both
 * arms observed) and the updater's {@link MergedPartials} (one entry per cell and source
 * partition, as decoded from the partials topic). The cells' names (study, strata, instrument
 * levels, window) are made before the baseline, as they are shared by many cells in practice;
 * each cell has its own key object and statistics. Run with a fixed heap and a stop-the-world
 * collector for stable numbers, e.g. {@code -Xms2g -Xmx2g -XX:+UseSerialGC}. Prints figures;
 * asserts nothing; not part of the test suite. In the monitor's package because it fills the
 * parser's reusable {@link ParsedEvent} directly, as the parser does.
 */
public final class CellHeapBenchmark {

    private static final int STRATA = 100;
    private static final int LEVELS = 10;

    private CellHeapBenchmark() {
    }

    public static void main(String[] args) {
        int cells = args.length > 0 ? Integer.parseInt(args[0]) : 200_000;
        int panes = Math.max(1, cells / (STRATA * LEVELS));
        cells = panes * STRATA * LEVELS;
        StudyConfig study = new StudyConfig("registry", new OutcomeRange(0, 1), List.of());
        WindowSpec hourly = new WindowSpec("hourly", WindowSpec.Kind.TUMBLING, Duration.ofHours(1), Duration.ofHours(1));
        String[] strata = names("stratum-", STRATA);
        String[] levels = names("level-", LEVELS);
        SourcePartition source = new SourcePartition("events", 0);
        ParsedEvent e = new ParsedEvent();

        long before = HeapInUse.afterGc();
        PartitionState state = new PartitionState(source, List.of(hourly), Duration.ofDays(100_000).toMillis(), (s, w) -> { });
        for (int p = 0; p < panes; p++) {
            for (String stratum : strata) {
                for (String level : levels) {
                    for (boolean treated : new boolean[] {true, false}) {
                        e.reset();
                        e.study = study;
                        e.stratum = stratum;
                        e.instrument = level;
                        e.treated = treated;
                        e.outcome = 0.5;
                        e.time = BenchEvents.START + p * 3_600_000L;
                        state.add(e);
                    }
                }
            }
        }
        long withState = HeapInUse.afterGc();
        report("aggregator (PartitionState)", withState - before, cells);

        // As decoded from the partials topic: every cell's statistics are objects of their own.
        MergedPartials merged = new MergedPartials();
        state.panes().forEach((key, arms) -> merged.pane(source, key, arms));
        Reference.reachabilityFence(state);
        state = null;
        long withMerged = HeapInUse.afterGc();
        report("updater (MergedPartials, one source)", withMerged - before, cells);
        Reference.reachabilityFence(merged);
    }

    private static String[] names(String prefix, int n) {
        String[] out = new String[n];
        for (int i = 0; i < n; i++) {
            out[i] = prefix + i;
        }
        return out;
    }

    private static void report(String what, long bytes, int cells) {
        System.out.printf(Locale.ROOT, "%-40s %,d cells: %,d bytes, %.0f bytes per cell%n", what, cells, bytes, (double) bytes / cells);
    }
}
