package dev.bracket.cli;

import dev.bracket.report.Cautions;
import dev.bracket.broker.EmbeddedBroker;
import dev.bracket.config.BracketConfig;
import dev.bracket.config.InputTopic;
import dev.bracket.demo.ShutdownGate;
import dev.bracket.report.BoundRow;
import dev.bracket.report.store.LatestReports;
import dev.bracket.report.store.PublishedReport;
import dev.bracket.app.Monitor;
import dev.bracket.stream.transaction.StreamMetrics;
import dev.bracket.web.WebServer;
import io.micrometer.prometheusmetrics.PrometheusConfig;
import io.micrometer.prometheusmetrics.PrometheusMeterRegistry;
import picocli.CommandLine;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;

import java.io.PrintWriter;
import java.nio.file.Path;
import java.time.Duration;
import java.time.LocalTime;
import java.time.temporal.ChronoUnit;
import java.util.Locale;
import java.util.concurrent.Callable;
import java.util.stream.Collectors;

/** {@code bracket monitor}: the streaming monitor; runs until stopped (Ctrl-C or SIGTERM). */
@Command(name = "monitor",
        mixinStandardHelpOptions = true,
        description = {
                "Reads outcome events from Kafka and publishes the bounds of every study, window and assumption set.",
                "Keeps per-partition statistics with exactly-once commits; bound documents go to the bounds topic.",
                "Without kafka.bootstrap.servers in the configuration it starts a single-node Kafka broker in this",
                "process, keeping its data under broker.data-dir (default ~/.local/state/bracket/kafka)."},
        footer = {"",
                Cautions.TEXT})
public final class MonitorCommand implements Callable<Integer> {

    @CommandLine.Spec
    CommandLine.Model.CommandSpec spec;

    @Option(names = "--config", required = true, paramLabel = "FILE", description = "The monitor's YAML configuration.")
    Path configFile;

    @Option(names = "--http-port", paramLabel = "PORT", defaultValue = "8080",
            description = "Serve the web page, the JSON API and Prometheus /metrics on this port; 0 picks a free one (default: ${DEFAULT-VALUE}).")
    int httpPort;

    @Option(names = "--http-bind", paramLabel = "ADDRESS", defaultValue = "127.0.0.1",
            description = "Address the HTTP server listens on; 0.0.0.0 for every interface (default: ${DEFAULT-VALUE}).")
    String httpBind;

    @Override
    public Integer call() throws InterruptedException {
        BracketConfig config = ConfigFiles.load(configFile);
        PrintWriter out = spec.commandLine().getOut();
        LatestReports latest = new LatestReports();
        PrometheusMeterRegistry registry = new PrometheusMeterRegistry(PrometheusConfig.DEFAULT);
        WebServer web = HttpServing.start(latest, registry, httpBind, httpPort);
        out.println("web page, JSON API and Prometheus metrics at " + web.address() + " (metrics: " + web.address() + "metrics)");
        out.flush();
        EmbeddedBroker broker = null;
        if (config.usesEmbeddedBroker()) {
            out.println("starting a Kafka broker in this process, data in " + config.brokerDataDir());
            out.flush();
            broker = EmbeddedBroker.start(config.brokerDataDir(), config.brokerPort());
            config = config.withBootstrapServers(broker.bootstrapServers());
            out.println("Kafka broker listening at " + broker.bootstrapServers() + " (use it as bootstrap.servers)");
        }
        Monitor monitor = Monitor.start(config, registry, latest);
        exitWhenFailed(monitor, spec.commandLine().getErr());
        web.showAlerts(monitor.alerts()::apiView);
        web.showHealth(monitor::liveness, monitor::readiness);
        out.printf(Locale.ROOT, "monitoring %d stud%s from %s; reports to topic %s; instance %s of group %s%n",
                config.studies().size(), config.studies().size() == 1 ? "y" : "ies",
                config.inputs().stream().map(InputTopic::topic).collect(Collectors.joining(", ")),
                config.topics().bounds(), config.instance(), config.group());
        out.flush();
        // SIGTERM and Ctrl-C end the loop below; the JVM waits for the final commit before it halts.
        try (ShutdownGate gate = new ShutdownGate("bracket-shutdown", Duration.ofMinutes(1))) {
            Duration every = config.progressInterval();
            while (!gate.awaitStop(every)) {
                out.println(progressLine(monitor, latest));
                out.flush();
            }
            monitor.close();
            web.close();
            if (broker != null) {
                broker.close();
            }
            out.println(monitor.failed() ? "stopped after a failure; nothing was committed after it" : "stopped after a final commit");
            out.flush();
        }
        return 0;
    }

    /**
     * A monitor whose aggregation or updater thread stopped would serve stale numbers as if
     * healthy: print why and exit with code 1 (the shutdown hooks still close what they can).
     */
    static void exitWhenFailed(Monitor monitor, PrintWriter err) {
        monitor.onFailure(why -> {
            err.println("bracket: " + why + "; exiting with code 1");
            err.flush();
            System.exit(1);
        });
    }

    static String progressLine(Monitor monitor, LatestReports latest) {
        StreamMetrics m = monitor.metrics();
        StringBuilder line = new StringBuilder();
        line.append(LocalTime.now().truncatedTo(ChronoUnit.SECONDS)).append(String.format(Locale.ROOT,
                " events used %d, rejected %d, late %d; partitions %d; commits %d",
                m.total("bracket.events", "result", "accepted"), m.total("bracket.events", "result", "rejected"),
                m.total("bracket.events.late"), monitor.assignedPartitions(), m.total("bracket.transactions", "result", "committed")));
        for (String study : latest.studies()) {
            PublishedReport r = latest.get(study, "cumulative").orElse(null);
            if (r == null || r.report().rows().isEmpty()) {
                continue;
            }
            BoundRow row = r.report().rows().get(0);
            line.append(String.format(Locale.ROOT, " | %s n=%d %s: %s", study, r.report().pooled().total(), row.assumptions(),
                    row.interval().isBounded()
                            ? String.format(Locale.ROOT, "[%.4f, %.4f]", row.interval().lower(), row.interval().upper())
                            : row.interval().status().id()));
        }
        return line.toString();
    }
}
