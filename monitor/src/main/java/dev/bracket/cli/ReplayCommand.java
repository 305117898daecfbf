package dev.bracket.cli;

import dev.bracket.report.Cautions;
import com.fasterxml.jackson.databind.node.ArrayNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import dev.bracket.config.BracketConfig;
import dev.bracket.config.InputTopic;
import dev.bracket.report.render.ReportJson;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.report.render.ReportTable;
import dev.bracket.stream.Replay;
import dev.bracket.stream.publish.ReportDocument;
import dev.bracket.stream.publish.WindowReport;
import picocli.CommandLine;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;
import picocli.CommandLine.Parameters;

import java.io.IOException;
import java.io.InputStream;
import java.io.PrintWriter;
import java.nio.file.Files;
import java.nio.file.NoSuchFileException;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.concurrent.Callable;

/** {@code bracket replay}: the monitor's parsing, validation and statistics over files of events. */
@Command(name = "replay",
        mixinStandardHelpOptions = true,
        description = {
                "Computes the bounds the monitor would publish, from files of JSON events (one per line).",
                "Reports every window that holds events (each hour of a day, say), not only the newest.",
                "Each file counts as one partition read in order; '-' reads standard input. --partition declares",
                "files that are one partition, read one after the other (order matters for late events).",
                "Unusable lines are counted and listed on standard error, as the monitor sends them to its rejected topic."},
        footer = {"",
                Cautions.TEXT,
                "",
                "Example:",
                "  bracket replay --config bracket.yaml events-monday.jsonl events-tuesday.jsonl --json",
                "  bracket replay --config bracket.yaml --partition p0-mon.jsonl,p0-tue.jsonl --partition p1-mon.jsonl,p1-tue.jsonl"})
public final class ReplayCommand implements Callable<Integer> {

    private static final int SHOW_REJECTED = 20;

    @CommandLine.Spec
    CommandLine.Model.CommandSpec spec;

    @Option(names = "--config", required = true, paramLabel = "FILE", description = "The monitor's YAML configuration.")
    Path configFile;

    @Option(names = "--fields-of", paramLabel = "TOPIC",
            description = "Read events with the field names configured for this input topic (default: the first input's).")
    String fieldsOf;

    @Option(names = "--json", description = "Print one JSON document with every study's report per window instead of tables.")
    boolean json;

    @Option(names = "--partition", paramLabel = "FILE[,FILE...]",
            description = "These files, in this order, are one partition (repeat for more partitions).")
    List<String> partitions = new ArrayList<>();

    @Parameters(arity = "0..*", paramLabel = "EVENTS", description = "Files of JSON lines, one partition each; '-' for standard input.")
    List<String> files = new ArrayList<>();

    @Override
    public Integer call() throws IOException {
        BracketConfig config = ConfigFiles.load(configFile);
        InputTopic input = config.inputs().stream().filter(i -> fieldsOf == null || i.topic().equals(fieldsOf)).findFirst()
                .orElseThrow(() -> new InputError("--fields-of '" + fieldsOf + "' is not an input topic of " + configFile
                        + "; configured: " + String.join(", ", config.inputs().stream().map(InputTopic::topic).toList())));
        List<List<String>> inputs = new ArrayList<>();
        partitions.forEach(p -> inputs.add(List.of(p.split(",", -1))));
        files.forEach(f -> inputs.add(List.of(f)));
        if (inputs.isEmpty()) {
            throw new InputError("no events to replay: give files of JSON lines, '-' for standard input, or --partition FILE,FILE");
        }
        for (List<String> partition : inputs) {
            for (String f : partition) {
                if (f.isBlank()) {
                    throw new InputError("--partition " + String.join(",", partition) + ": an empty file name (two commas in a row?)");
                }
                if (!f.equals("-") && !Files.isReadable(Path.of(f))) {
                    throw new InputError(f + ": no such file or not readable");
                }
            }
        }
        Replay replay = new Replay(config, input.fields(), SHOW_REJECTED, System.currentTimeMillis());
        for (List<String> partition : inputs) {
            replay.newPartition(String.join("+", partition));
            for (String f : partition) {
                if (f.equals("-")) {
                    replay.readMore("stdin", System.in);
                } else {
                    try (InputStream in = Files.newInputStream(Path.of(f))) {
                        replay.readMore(f, in);
                    } catch (NoSuchFileException e) {
                        throw new InputError(f + ": no such file");
                    }
                }
            }
        }
        Replay.Result result = replay.finish();
        PrintWriter out = spec.commandLine().getOut();
        if (json) {
            out.println(ReportJson.mapper().writerWithDefaultPrettyPrinter().writeValueAsString(toJson(result)));
        } else {
            printTables(out, result);
        }
        out.flush();
        printRejected(spec.commandLine().getErr(), result);
        return 0;
    }

    private static ObjectNode toJson(Replay.Result result) {
        ObjectNode root = ReportJson.mapper().createObjectNode();
        root.put("schema", "bracket.replay/3");
        root.put("accepted", result.accepted());
        ObjectNode rejected = root.putObject("rejected");
        rejected.put("total", result.rejectedTotal());
        ObjectNode byReason = rejected.putObject("byReason");
        result.rejectedByReason().forEach((r, n) -> byReason.put(r.id(), n));
        ArrayNode reports = root.putArray("reports");
        result.reports().forEach(r -> reports.add(ReportDocument.toJson(r, 1, null)));
        return root;
    }

    private static void printTables(PrintWriter out, Replay.Result result) {
        out.printf(Locale.ROOT, "%d event(s) used, %d rejected%n", result.accepted(), result.rejectedTotal());
        for (WindowReport r : result.reports()) {
            out.println();
            String span = r.window().kind() == dev.bracket.config.WindowSpec.Kind.CUMULATIVE ? "all events"
                    : java.time.Instant.ofEpochMilli(r.start()) + " to " + java.time.Instant.ofEpochMilli(r.end());
            out.printf(Locale.ROOT, "== study %s, window %s (%s)%s%n", r.study().id(), r.window().name(), span,
                    r.lateEvents() > 0 ? ", " + r.lateEvents() + " late event(s) left out" : "");
            out.print(ReportTable.render(r.report()));
            if (r.lost() != null) {
                out.println(lostLine(r));
            }
        }
        out.println();
        out.println(ReportDocument.CAUTION);
    }

    /** Units lost to follow-up per arm, with their share of the arm's units (the JSON's {@code lostToFollowUp}). */
    private static String lostLine(WindowReport r) {
        ObservedArms pooled = r.report().pooled();
        return String.format(Locale.ROOT, "Lost to follow-up (still pending %s after exposure): treated %d (%s), control %d (%s).",
                horizonText(r.lost().horizon()),
                r.lost().treated(), percent(r.lost().share(true, pooled.treated())),
                r.lost().control(), percent(r.lost().share(false, pooled.control())));
    }

    /** The horizon as a configuration writes it: 10d, or 36h, 90m (ISO-8601 without its prefix). */
    private static String horizonText(java.time.Duration horizon) {
        return horizon.toSeconds() % 86_400 == 0 ? horizon.toDays() + "d"
                : horizon.toString().replaceFirst("^PT", "").toLowerCase(Locale.ROOT);
    }

    private static String percent(double share) {
        return Double.isNaN(share) ? "no units" : String.format(Locale.ROOT, "%.1f%% of its units", 100 * share);
    }

    private static void printRejected(PrintWriter err, Replay.Result result) {
        if (result.rejectedTotal() == 0) {
            return;
        }
        for (Replay.Rejected r : result.rejected()) {
            err.printf(Locale.ROOT, "%s:%d: rejected (%s): %s%n", r.source(), r.line(), r.reason().id(), r.detail());
        }
        if (result.rejectedTotal() > result.rejected().size()) {
            err.printf(Locale.ROOT, "... and %d more rejected line(s)%n", result.rejectedTotal() - result.rejected().size());
        }
        StringBuilder summary = new StringBuilder();
        result.rejectedByReason().forEach((r, n) -> summary.append(summary.isEmpty() ? "" : ", ").append(r.id()).append(' ').append(n));
        err.printf(Locale.ROOT, "rejected %d line(s): %s%n", result.rejectedTotal(), summary);
        err.flush();
    }
}
