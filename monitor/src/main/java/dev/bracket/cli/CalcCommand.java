package dev.bracket.cli;

import com.fasterxml.jackson.databind.node.ObjectNode;
import dev.bracket.report.Cautions;
import dev.bracket.bands.AnytimeBand;
import dev.bracket.bands.BandMethod;
import dev.bracket.bands.BandConfig;
import dev.bracket.bands.VarianceBasis;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.Direction;
import dev.bracket.bounds.InstrumentAssumption;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeKind;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.bounds.StudyCells;
import dev.bracket.report.render.ReportJson;
import dev.bracket.report.render.ReportTable;
import dev.bracket.report.StudyReport;
import picocli.CommandLine;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;

import java.io.IOException;
import java.io.Reader;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.NoSuchFileException;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Set;
import java.util.concurrent.Callable;

/** {@code bracket calc}: intervals from summary statistics, without a stream. */
@Command(name = "calc",
        mixinStandardHelpOptions = true,
        description = {
                "Bounds on the average treatment effect from per-arm summary statistics.",
                "Give the two arms with --treated-* and --control-*, or many cells (strata, instrument levels) with --cells.",
                "Without --assume every single assumption is reported.",
                "Each interval gets confidence bands (--bands): a fixed band, valid",
                "for one look planned in advance, and an anytime band, valid however often",
                "the data are looked at (the one to act on)."},
        footer = {"",
                "Assumptions: worst-case, mtr-positive, mtr-negative, mts-positive, mts-negative,",
                "optimizing-selection, sorting-on-gains. Join several with commas to assume them together.",
                "",
                "Instrument levels (the instrument column of --cells): --instrument mean-independent",
                "intersects each level's bounds (any outcome); --instrument independent gives the",
                "sharp bounds when the instrument is independent of how units would take treatment",
                "and of their potential outcomes (a randomised assignment or lottery), by linear",
                "programming; it needs --outcome-kind binary. Refuted means the data contradict it.",
                "",
                "Standard deviations (--treated-sd, --control-sd or the sd column) stand in",
                "for the spread of each arm's outcomes in the fixed-horizon band's standard",
                "errors. Without an SD for every arm, that band assumes the largest spread",
                "possible in [A, B], variance (B-A)^2/4: safe, but wide. The anytime band",
                "needs no SD; it uses only counts, means and the declared range.",
                "",
                Cautions.TEXT,
                "",
                "Example:",
                "  bracket calc --min 0 --max 1 --treated-n 400 --treated-mean 0.62 --control-n 600 --control-mean 0.48 \\",
                "               --assume worst-case --assume mtr-positive,mts-positive"})
public final class CalcCommand implements Callable<Integer> {

    @CommandLine.Spec
    CommandLine.Model.CommandSpec spec;

    @Option(names = "--min", required = true, paramLabel = "A", description = "Smallest possible outcome (declared, not estimated).")
    double min;

    @Option(names = "--max", required = true, paramLabel = "B", description = "Largest possible outcome (declared, not estimated).")
    double max;

    @Option(names = "--better", paramLabel = "higher|lower", defaultValue = "higher",
            description = "Which outcomes are better; matters for optimizing-selection and sorting-on-gains (default: ${DEFAULT-VALUE}).")
    String better;

    @Option(names = "--outcome-kind", paramLabel = "bounded|binary", defaultValue = "bounded",
            description = "bounded: outcomes anywhere in [A, B]; binary: every outcome equals A or B (default: ${DEFAULT-VALUE}).")
    String outcomeKind;

    @Option(names = "--instrument", paramLabel = "mean-independent|independent", defaultValue = "mean-independent",
            description = "What is assumed about the instrument levels of --cells (default: ${DEFAULT-VALUE}); independent needs --outcome-kind binary.")
    String instrument;

    @Option(names = "--treated-n", paramLabel = "N1", description = "Units that received treatment.")
    Long treatedN;

    @Option(names = "--treated-mean", paramLabel = "M1", description = "Mean outcome of treated units.")
    Double treatedMean;

    @Option(names = "--treated-sd", paramLabel = "S1", description = "Sample standard deviation of treated outcomes (optional; used by the fixed band).")
    Double treatedSd;

    @Option(names = "--control-n", paramLabel = "N0", description = "Units that did not receive treatment.")
    Long controlN;

    @Option(names = "--control-mean", paramLabel = "M0", description = "Mean outcome of untreated units.")
    Double controlMean;

    @Option(names = "--control-sd", paramLabel = "S0", description = "Sample standard deviation of untreated outcomes (optional; used by the fixed band).")
    Double controlSd;

    @Option(names = "--cells", paramLabel = "FILE",
            description = "CSV with a header: arm,n,mean[,sd][,stratum][,instrument]; one row per arm and cell ('-' reads standard input).")
    String cellsFile;

    @Option(names = "--assume", paramLabel = "SET",
            description = "Comma-separated assumptions held together; repeat for more rows (default: each single assumption).")
    List<String> assume = new ArrayList<>();

    @Option(names = "--json", description = "Print the versioned JSON document instead of the table.")
    boolean json;

    @Option(names = "--band-level", paramLabel = "L", defaultValue = "0.95",
            description = "Confidence level of the bands, strictly between 0 and 1 (default: ${DEFAULT-VALUE}).")
    double bandLevel;

    @Option(names = "--bands", paramLabel = "both|fixed|anytime|none", defaultValue = "both",
            description = "Which confidence bands to show (default: ${DEFAULT-VALUE}).")
    String bands;

    @Override
    public Integer call() throws IOException {
        OutcomeRange range = range();
        InstrumentAssumption instrumentAssumption = instrument(range);
        List<AssumptionSet> sets = sets().stream().map(set -> set.withInstrument(instrumentAssumption)).toList();
        BandConfig bands = bandConfig();
        CalcInput.Cells input = cellsFile != null ? cellsFromFile(range) : cellsFromFlags(range);
        StudyReport report = StudyReport.of(input.cells(), range, sets,
                bands.withVariance(input.everySdGiven() ? VarianceBasis.SAMPLE : VarianceBasis.RANGE_BOUND));
        if (json) {
            ObjectNode doc = ReportJson.toJson(report);
            forgetUngivenSds((ObjectNode) doc.get("arms"), input.everySdGiven());
            spec.commandLine().getOut().println(ReportJson.mapper().writerWithDefaultPrettyPrinter().writeValueAsString(doc));
        } else {
            spec.commandLine().getOut().print(ReportTable.render(report));
        }
        spec.commandLine().getOut().flush();
        return 0;
    }

    /**
     * An SD that was not given is unknown, not 0 (the arms hold 0 in its place): null in JSON.
     * From a file, an arm's pooled SD needs every cell's SD, so without them both are null.
     */
    private void forgetUngivenSds(ObjectNode arms, boolean everySdGiven) {
        boolean fromFile = cellsFile != null;
        if (fromFile ? !everySdGiven : treatedSd == null) {
            ((ObjectNode) arms.get("treated")).putNull("sd");
        }
        if (fromFile ? !everySdGiven : controlSd == null) {
            ((ObjectNode) arms.get("control")).putNull("sd");
        }
    }

    private OutcomeRange range() {
        if (!Double.isFinite(min) || !Double.isFinite(max) || !(min < max)) {
            throw new InputError("--min and --max must be finite numbers with --min < --max, were "
                    + CalcInput.fmt(min) + " and " + CalcInput.fmt(max));
        }
        Direction direction;
        try {
            direction = Direction.parse(better);
        } catch (IllegalArgumentException e) {
            throw new InputError("--better " + e.getMessage());
        }
        try {
            return new OutcomeRange(min, max, direction, OutcomeKind.parse(outcomeKind));
        } catch (IllegalArgumentException e) {
            throw new InputError("--outcome-kind " + e.getMessage());
        }
    }

    private InstrumentAssumption instrument(OutcomeRange range) {
        InstrumentAssumption assumption;
        try {
            assumption = InstrumentAssumption.parse(instrument);
        } catch (IllegalArgumentException e) {
            throw new InputError("--instrument " + e.getMessage());
        }
        if (!assumption.supports(range.kind())) {
            throw new InputError("--instrument independent needs --outcome-kind binary (every outcome equal to --min or --max); "
                    + "for outcomes anywhere in the range use --instrument mean-independent");
        }
        return assumption;
    }

    private List<AssumptionSet> sets() {
        try {
            return AssumptionSet.parseAll(assume);
        } catch (IllegalArgumentException e) {
            throw new InputError("--assume " + e.getMessage());
        }
    }

    private BandConfig bandConfig() {
        if (!(bandLevel > 0 && bandLevel < 1)) {
            throw new InputError("--band-level must lie strictly between 0 and 1 (for example 0.95), was "
                    + CalcInput.fmt(bandLevel));
        }
        Set<BandMethod> methods;
        try {
            methods = BandMethod.parseChoice(bands);
        } catch (IllegalArgumentException e) {
            throw new InputError("--bands " + e.getMessage());
        }
        return new BandConfig(bandLevel, methods, VarianceBasis.SAMPLE, AnytimeBand.DEFAULT_PLANNED_COUNT);
    }

    private CalcInput.Cells cellsFromFlags(OutcomeRange range) {
        requireFlag(treatedN, "--treated-n");
        requireFlag(treatedMean, "--treated-mean");
        requireFlag(controlN, "--control-n");
        requireFlag(controlMean, "--control-mean");
        Double sd1 = CalcInput.knownSd(treatedSd, treatedN, treatedMean, range);
        Double sd0 = CalcInput.knownSd(controlSd, controlN, controlMean, range);
        ObservedArms arms = new ObservedArms(
                CalcInput.arm(treatedN, treatedMean, sd1 == null ? 0.0 : sd1, range, "--treated-"),
                CalcInput.arm(controlN, controlMean, sd0 == null ? 0.0 : sd0, range, "--control-"));
        boolean everySdGiven = (sd1 != null || treatedN < 2) && (sd0 != null || controlN < 2);
        return new CalcInput.Cells(StudyCells.single(arms), everySdGiven);
    }

    private CalcInput.Cells cellsFromFile(OutcomeRange range) throws IOException {
        for (Object flag : new Object[] {treatedN, treatedMean, treatedSd, controlN, controlMean, controlSd}) {
            if (flag != null) {
                throw new InputError("--cells cannot be combined with --treated-* or --control-*; put every arm in the file");
            }
        }
        if (cellsFile.equals("-")) {
            Reader in = new java.io.InputStreamReader(System.in, StandardCharsets.UTF_8);
            return CellsCsv.read(in, "standard input", range);
        }
        try (Reader in = Files.newBufferedReader(Path.of(cellsFile), StandardCharsets.UTF_8)) {
            return CellsCsv.read(in, cellsFile, range);
        } catch (NoSuchFileException e) {
            throw new InputError("--cells: no such file '" + cellsFile + "'");
        }
    }

    private static void requireFlag(Object value, String flag) {
        if (value == null) {
            throw new InputError("missing " + flag + " (or give all arms with --cells FILE)");
        }
    }
}
