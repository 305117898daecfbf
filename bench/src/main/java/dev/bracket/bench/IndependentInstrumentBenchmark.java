package dev.bracket.bench;

import dev.bracket.bands.BandConfig;
import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.Direction;
import dev.bracket.bounds.IndependentInstrumentBounds;
import dev.bracket.bounds.InstrumentAssumption;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeKind;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.bounds.StudyCells;
import dev.bracket.report.StudyReport;

import java.lang.management.ManagementFactory;
import java.lang.management.ThreadMXBean;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;
import java.util.SplittableRandom;

/**
 * What the monitor pays per study and publish for bounds under an independent instrument
 * ({@link IndependentInstrumentBounds}): the time of {@link StudyReport#of} with both confidence
 * bands (what the bound updater runs for every window of a study it publishes), for 2, 3 and 4
 * instrument levels, with one assumption set and with the default of every single assumption,
 * beside the mean-independence bounds for comparison. Each call gets fresh cell counts
 * (two-sided compliance, about 10,000 units per level). Every configuration first runs once
 * unmeasured (to warm the JIT on all code paths), then ROUNDS rounds of CALLS calls each; prints
 * the median round, in CPU microseconds of the calling thread per publish, and the machine's
 * load average (the machine is shared: compare figures within one run). No broker and no waits.
 * A guide, asserts nothing, not part of the test suite; run by {@code bench/run instruments}.
 *
 * <pre>
 * IndependentInstrumentBenchmark [CALLS] [ROUNDS]
 * </pre>
 */
public final class IndependentInstrumentBenchmark {

    /** CPU time of this thread: on a shared, overloaded machine wall-clock time mostly measures the neighbours. */
    private static final ThreadMXBean CPU = ManagementFactory.getThreadMXBean();

    private static final OutcomeRange BINARY = new OutcomeRange(0, 1, Direction.HIGHER, OutcomeKind.BINARY);

    private IndependentInstrumentBenchmark() {
    }

    public static void main(String[] args) {
        int calls = args.length > 0 ? Integer.parseInt(args[0]) : 300;
        int rounds = args.length > 1 ? Integer.parseInt(args[1]) : 5;
        BandConfig bands = BandConfig.both(0.95);
        for (boolean measure : new boolean[] {false, true}) {
            if (measure) {
                System.out.println("CPU microseconds per study per publish (interval + fixed-horizon + anytime band), median of "
                        + rounds + " rounds of " + calls + " calls; load average "
                        + ManagementFactory.getOperatingSystemMXBean().getSystemLoadAverage());
                System.out.printf(Locale.ROOT, "%-7s %-18s %-16s %12s%n", "levels", "assumption sets", "instrument", "us/publish");
            }
            for (int levels = 2; levels <= 4; levels++) {
                for (boolean allSingles : new boolean[] {false, true}) {
                    List<AssumptionSet> sets = allSingles ? AssumptionSet.eachSingle() : List.of(AssumptionSet.parse("worst-case"));
                    for (InstrumentAssumption instrument : InstrumentAssumption.values()) {
                        List<AssumptionSet> withInstrument = sets.stream().map(s -> s.withInstrument(instrument)).toList();
                        double micros = time(levels, withInstrument, bands, calls, measure ? rounds : 1);
                        if (measure) {
                            System.out.printf(Locale.ROOT, "%-7d %-18s %-16s %12.0f%n", levels,
                                    allSingles ? "7 (each single)" : "1 (worst-case)", instrument.id(), micros);
                        }
                    }
                }
            }
        }
    }

    private static double time(int levels, List<AssumptionSet> sets, BandConfig bands, int calls, int rounds) {
        SplittableRandom rng = new SplittableRandom(7);
        List<StudyCells> inputs = new ArrayList<>();
        for (int i = 0; i < calls; i++) {
            inputs.add(cells(rng, levels));
        }
        double[] perRound = new double[rounds];
        long sink = 0;
        for (int r = 0; r < rounds; r++) {
            long start = CPU.getCurrentThreadCpuTime();
            for (StudyCells c : inputs) {
                sink += StudyReport.of(c, BINARY, sets, bands).rows().size();
            }
            perRound[r] = (CPU.getCurrentThreadCpuTime() - start) / 1e3 / calls;
        }
        if (sink == 42) {
            System.out.println(); // keeps the work observable to the JIT
        }
        Arrays.sort(perRound);
        return perRound[rounds / 2];
    }

    /** Two-sided compliance: the treated share rises with the level; outcomes differ by arm and level. */
    private static StudyCells cells(SplittableRandom rng, int levels) {
        StudyCells cells = StudyCells.empty();
        for (int z = 0; z < levels; z++) {
            long n = 9_000 + rng.nextInt(2_000);
            long treated = Math.round(n * (0.2 + 0.5 * z / (levels - 1.0) + 0.02 * rng.nextDouble()));
            double mu1 = 0.55 + 0.05 * rng.nextDouble();
            double mu0 = 0.35 + 0.05 * rng.nextDouble();
            cells = cells.with(StudyCells.NONE, "z" + z, new ObservedArms(arm(treated, mu1), arm(n - treated, mu0)));
        }
        return cells;
    }

    private static ArmStatistics arm(long n, double share) {
        long ones = Math.round(n * share);
        double u = (double) ones / n;
        return new ArmStatistics(n, u, n * u * (1 - u), 0, 1);
    }
}
