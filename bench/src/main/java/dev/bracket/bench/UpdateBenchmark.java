package dev.bracket.bench;

import dev.bracket.bands.BandConfig;
import dev.bracket.bands.ImbensManski;
import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.Direction;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeKind;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.bounds.StudyCells;
import dev.bracket.config.BracketConfig;
import dev.bracket.config.StudyConfig;
import dev.bracket.config.WindowSpec;
import dev.bracket.report.StudyReport;
import dev.bracket.stream.ingest.PaneKey;
import dev.bracket.stream.publish.MergedPartials;
import dev.bracket.stream.publish.ReportDocument;
import dev.bracket.stream.ingest.SourcePartition;
import dev.bracket.stream.ingest.SourceProgress;
import dev.bracket.stream.publish.WindowReport;
import dev.bracket.stream.publish.WindowSpans;

import java.io.IOException;
import java.lang.management.ManagementFactory;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Instant;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Set;
import java.util.SplittableRandom;
import java.util.function.ToLongFunction;
import java.util.stream.Collectors;

/**
 * What a publish of the bound updater costs: the report path it runs for every study and window
 * it publishes ({@link WindowReport#current} over {@link MergedPartials} filled from 3 source
 * partitions, {@link ReportDocument} encoded to bytes), without Kafka, on invented cells. Prints
 * one line per figure: CPU time of the measuring thread (the machine is shared, so wall time
 * would mostly measure the neighbours), the median of ROUNDS rounds after unmeasured warm-up rounds
 * for a second of CPU time, bytes allocated by the thread, and document sizes. With a file of figures from an
 * earlier run (the same program's output) it prints those beside. A guide, asserts nothing, not
 * part of the test suite; run by {@code bench/run updates}.
 *
 * <pre>
 * UpdateBenchmark [ROUNDS] [BEFORE-FILE]
 * </pre>
 */
public final class UpdateBenchmark {

    private static final com.sun.management.ThreadMXBean THREAD =
            (com.sun.management.ThreadMXBean) ManagementFactory.getThreadMXBean();
    private static final OutcomeRange RANGE = new OutcomeRange(-5, 5, Direction.HIGHER, OutcomeKind.BOUNDED);
    private static final int STUDIES = 1000;
    private static final int STRATA = 20;
    private static final List<SourcePartition> SOURCES =
            List.of(new SourcePartition("events", 0), new SourcePartition("events", 1), new SourcePartition("events", 2));
    private static final long HOUR = 3_600_000L;
    private static final long T0 = 1_735_689_600_000L + 10 * 60_000L;

    private final int rounds;
    private final Map<String, String> before;
    private long sink;

    private UpdateBenchmark(int rounds, Map<String, String> before) {
        this.rounds = rounds;
        this.before = before;
    }

    public static void main(String[] args) throws IOException {
        int rounds = args.length > 0 ? Integer.parseInt(args[0]) : 5;
        Map<String, String> before = new LinkedHashMap<>();
        if (args.length > 1) {
            for (String line : Files.readAllLines(Path.of(args[1]))) {
                int bar = line.indexOf(" | ");
                if (line.startsWith("| ") && bar > 0) {
                    String[] cols = line.split(" \\| ");
                    before.put(cols[0].substring(2).trim(), cols[cols.length - 2].trim());
                }
            }
        }
        new UpdateBenchmark(rounds, before).run();
    }

    private void run() throws IOException {
        System.out.printf(Locale.ROOT, "thread CPU time, median of %d rounds; load average %.1f on %d cores%n", rounds,
                ManagementFactory.getOperatingSystemMXBean().getSystemLoadAverage(), Runtime.getRuntime().availableProcessors());
        System.out.println("| what | unit | before | now | goal |");
        System.out.println("|---|---|---|---|---|");
        SplittableRandom rng = new SplittableRandom(16);
        List<AssumptionSet> seven = AssumptionSet.eachSingle();
        BandConfig none = BandConfig.none();
        BandConfig both = BandConfig.both(0.95);
        List<StudyCells> single = new ArrayList<>();
        List<StudyCells> strata = new ArrayList<>();
        List<StudyCells> levels = new ArrayList<>();
        for (int i = 0; i < 200; i++) {
            single.add(cells(rng, 1, 1));
            strata.add(cells(rng, STRATA, 1));
            levels.add(cells(rng, 1, 4));
        }
        row("bounds only, single cell, 7 rows", "us/study", perCall(single, c -> StudyReport.of(c, RANGE, seven, none).rows().size()) / 1e3, "keep");
        row("bounds + fixed + anytime band, single cell", "us/cell", perCall(single, c -> StudyReport.of(c, RANGE, seven, both).rows().size()) / 1e3, "<= 5");
        row("same, 20 strata", "us/cell", perCall(strata, c -> StudyReport.of(c, RANGE, seven, both).rows().size()) / 1e3 / STRATA, "<= 5");
        row("same, 4 instrument levels", "us/cell", perCall(levels, c -> StudyReport.of(c, RANGE, seven, both).rows().size()) / 1e3 / 4, "<= 5");
        List<double[]> widths = new ArrayList<>();
        for (int i = 0; i < 1000; i++) {
            widths.add(new double[] {rng.nextDouble() * 4});
        }
        row("Imbens-Manski critical value", "us/call", perCall(widths, x -> (long) ImbensManski.criticalValue(0.95, x[0])) / 1e3, "<< 1");

        for (int s : new int[] {1, STRATA}) {
            Publisher p = new Publisher(100, s, rng);
            long cpu = median(() -> p.publish(p.studies));
            long bytes = allocated(() -> p.publish(p.studies));
            double cells = p.cellCount();
            String label = s == 1 ? "1 stratum" : s + " strata";
            row("full publish incl. JSON, " + label, "us/cell", cpu / 1e3 / cells, "<= 8");
            row("allocation per cell per publish, " + label, "KB", bytes / 1024.0 / cells, "<= 2");
            row("bound document size, " + label, "KB", p.documentBytes / 1024.0 / p.documents, "state");
        }
        Publisher big = new Publisher(STUDIES, STRATA, rng);
        row(STUDIES + " studies x " + STRATA + " strata x 3 windows, one publish", "s CPU", median(() -> big.publish(big.studies)) / 1e9, "<= 0.5");
        double interval = big.config.publishInterval().toNanos();
        long oneInterval = median(() -> {
            big.changeStudies(STUDIES / 100, rng);
            MergedPartials.Changes changes = big.merged.takeChanges();
            return big.publish(dueStudies(big, changes));
        });
        row("1% of studies change per interval", "% of a core", 100 * oneInterval / interval, "< 5");
        if (sink == 42) {
            System.out.println();
        }
    }

    /** The studies the bound updater recomputes after these changes: the changed ones, all when a window's span moved. */
    private static List<StudyConfig> dueStudies(Publisher p, MergedPartials.Changes changes) {
        boolean all = changes.watermarkMoved() && p.spans.moved(p.merged.watermark());
        Set<String> due = all ? p.studies.stream().map(StudyConfig::id).collect(Collectors.toSet()) : changes.studies();
        return p.studies.stream().filter(s -> due.contains(s.id())).toList();
    }

    private void row(String what, String unit, double now, String goal) {
        String fmt = now < 10 ? "%.2f" : "%.1f";
        System.out.printf(Locale.ROOT, "| %s | %s | %s | " + fmt + " | %s |%n", what, unit, before.getOrDefault(what, "-"), now, goal);
    }

    /** Median CPU nanoseconds per element of one pass of {@code work} over {@code inputs}. */
    private <T> double perCall(List<T> inputs, ToLongFunction<T> work) {
        return median(() -> {
            long s = 0;
            for (T t : inputs) {
                s += work.applyAsLong(t);
            }
            return s;
        }) / (double) inputs.size();
    }

    /** Median thread CPU nanoseconds of one round, after unmeasured rounds for at least a second of CPU time (the JIT's warm-up). */
    private long median(java.util.function.LongSupplier round) {
        long warm = THREAD.getCurrentThreadCpuTime();
        do {
            sink += round.getAsLong();
        } while (THREAD.getCurrentThreadCpuTime() - warm < 1_000_000_000L);
        long[] t = new long[rounds];
        for (int r = 0; r < rounds; r++) {
            long start = THREAD.getCurrentThreadCpuTime();
            sink += round.getAsLong();
            t[r] = THREAD.getCurrentThreadCpuTime() - start;
        }
        Arrays.sort(t);
        return t[rounds / 2];
    }

    private long allocated(java.util.function.LongSupplier round) {
        long id = Thread.currentThread().getId();
        long start = THREAD.getThreadAllocatedBytes(id);
        sink += round.getAsLong();
        return THREAD.getThreadAllocatedBytes(id) - start;
    }

    /** One study's cells: about 10,000 units per stratum and level, outcomes in [-5, 5]. */
    private static StudyCells cells(SplittableRandom rng, int strata, int levels) {
        StudyCells cells = StudyCells.empty();
        for (int s = 0; s < strata; s++) {
            for (int z = 0; z < levels; z++) {
                cells = cells.with(strata == 1 ? StudyCells.NONE : "s" + s, levels == 1 ? StudyCells.NONE : "z" + z, arms(rng, 1));
            }
        }
        return cells;
    }

    /** Both arms of one cell, a {@code share} of about 10,000 units. */
    private static ObservedArms arms(SplittableRandom rng, double share) {
        long n = Math.max(4, Math.round((9_000 + rng.nextInt(2_000)) * share));
        long treated = Math.round(n * (0.3 + 0.4 * rng.nextDouble()));
        return new ObservedArms(arm(rng, treated, 0.4), arm(rng, n - treated, 0));
    }

    private static ArmStatistics arm(SplittableRandom rng, long n, double shift) {
        double mean = shift + rng.nextDouble() - 0.5;
        double sd = 1 + rng.nextDouble();
        return new ArmStatistics(n, mean, sd * sd * (n - 1), -5, 5);
    }

    /** Merged partials of STUDIES studies in three windows, as the updater holds them, and its report path. */
    private static final class Publisher {
        final BracketConfig config;
        final List<StudyConfig> studies;
        final MergedPartials merged = new MergedPartials();
        final WindowSpans spans;
        final int strata;
        long watermark = T0;
        long documentBytes;
        long documents;
        long revision;

        Publisher(int count, int strata, SplittableRandom rng) {
            this.strata = strata;
            StringBuilder yaml = new StringBuilder("studies:\n");
            String assume = AssumptionSet.eachSingle().stream().map(a -> "[" + String.join(", ", a.ids()) + "]").collect(Collectors.joining(", "));
            for (int i = 0; i < count; i++) {
                yaml.append("  - id: study-").append(i).append("\n    outcome: {min: -5, max: 5}\n    assume: [").append(assume).append("]\n");
            }
            yaml.append("""
                    inputs:
                      - topic: events
                    windows:
                      - {name: hourly, kind: tumbling, size: 1h}
                      - {name: last-day, kind: sliding, size: 24h, step: 1h}
                    kafka:
                      bootstrap.servers: localhost:9
                    """);
            config = BracketConfig.parse("updates.yaml", yaml.toString());
            studies = config.studies();
            spans = new WindowSpans(config.windows());
            for (StudyConfig s : studies) {
                fill(s.id(), rng);
            }
            progress();
            merged.takeChanges();
            spans.moved(merged.watermark());
        }

        /** Every source's statistics of every stratum of the study in every window (the current pane). */
        void fill(String study, SplittableRandom rng) {
            for (WindowSpec w : config.windows()) {
                for (SourcePartition source : SOURCES) {
                    for (int s = 0; s < strata; s++) {
                        PaneKey key = new PaneKey(study, strata == 1 ? StudyCells.NONE : "s" + s, StudyCells.NONE, w.name(), w.paneStart(watermark));
                        merged.pane(source, key, arms(rng, 1.0 / SOURCES.size()));
                    }
                }
            }
        }

        /** Event time moves on by half a second (within the hour), as it does between two publishes. */
        void progress() {
            watermark += 500;
            for (SourcePartition source : SOURCES) {
                merged.progress(source, new SourceProgress(watermark, Map.of()));
            }
        }

        /** New statistics for {@code n} random studies and event time moving on. */
        void changeStudies(int n, SplittableRandom rng) {
            for (int i = 0; i < n; i++) {
                fill(studies.get(rng.nextInt(studies.size())).id(), rng);
            }
            progress();
        }

        int cellCount() {
            return studies.size() * strata * config.windows().size();
        }

        /** What the updater does per published study: every window's report, its document as bytes. */
        long publish(List<StudyConfig> due) {
            Instant now = Instant.now();
            long bytes = 0;
            long docs = 0;
            for (StudyConfig study : due) {
                for (WindowSpec window : config.windows()) {
                    WindowReport report = WindowReport.current(study, window, merged, config.bands());
                    bytes += ReportDocument.bytes(report, ++revision, now).length;
                    docs++;
                }
            }
            documentBytes = bytes;
            documents = docs;
            return bytes;
        }
    }
}
