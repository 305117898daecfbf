package dev.bracket.cli;

import dev.bracket.report.Cautions;
import dev.bracket.broker.EmbeddedBroker;
import dev.bracket.config.BracketConfig;
import dev.bracket.demo.DemoProducer;
import dev.bracket.demo.DemoProducerCommand;
import dev.bracket.duration.DurationText;
import dev.bracket.demo.EventFeed;
import dev.bracket.demo.RegistryScenario;
import dev.bracket.demo.RolloutScenario;
import dev.bracket.demo.ScenarioFeed;
import dev.bracket.demo.ScenarioOptions;
import dev.bracket.demo.ShutdownGate;
import dev.bracket.demo.ScenarioConfig;
import dev.bracket.demo.TrueEffects;
import dev.bracket.report.store.LatestReports;
import dev.bracket.report.store.PublishedReport;
import dev.bracket.app.Monitor;
import dev.bracket.web.WebServer;
import io.micrometer.prometheusmetrics.PrometheusConfig;
import io.micrometer.prometheusmetrics.PrometheusMeterRegistry;
import org.apache.kafka.clients.producer.Producer;
import picocli.CommandLine;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;

import java.io.IOException;
import java.io.PrintWriter;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.util.Comparator;
import java.util.Optional;
import java.util.concurrent.Callable;
import java.util.stream.Stream;

/**
 * {@code bracket demo}: everything in one process. A Kafka broker, the simulated rollout sending
 * events, the monitor reading them and the HTTP server, with a terminal view that puts each
 * interval beside the true effect only a simulation knows.
 */
@Command(name = "demo",
        mixinStandardHelpOptions = true,
        description = {
                "Runs everything in one process on invented data: a Kafka broker, a simulated rollout, the monitor and the web page.",
                "On-call engineers turn a new setting on for hosts they choose, so comparing hosts with and without it is biased. "
                        + "The terminal shows every assumption set's interval beside the true effect, which only a simulation knows.",
                "Stops at the end of --duration or on Ctrl-C; nothing is kept afterwards."},
        footer = {"",
                "The scenario and its numbers are invented for demonstration.", Cautions.TEXT})
public final class DemoCommand implements Callable<Integer> {

    static final String STUDY = DemoProducerCommand.DEFAULT_STUDY;
    static final String TOPIC = "bracket-demo-events";
    private static final Duration DRAIN_LIMIT = Duration.ofSeconds(20);

    @CommandLine.Spec
    CommandLine.Model.CommandSpec spec;

    @Option(names = "--duration", paramLabel = "TIME", defaultValue = "2m", converter = DurationText.Converter.class,
            description = "How long to send events, e.g. 90s or 10m (default: ${DEFAULT-VALUE}).")
    Duration duration;

    @Option(names = "--rate", paramLabel = "EVENTS_PER_S", defaultValue = "500",
            description = "Simulated events per second (default: ${DEFAULT-VALUE}).")
    double rate;

    @CommandLine.Mixin
    ScenarioOptions scenarioOptions;

    @Option(names = "--scenario", paramLabel = "NAME", defaultValue = "rollout",
            description = "rollout (hosts picked by engineers) or registry (outcomes that arrive late, good ones later)"
                    + " (default: ${DEFAULT-VALUE}).")
    String scenarioName;

    @Option(names = "--http-port", paramLabel = "PORT", defaultValue = "8080",
            description = "HTTP port of the page, JSON API and /metrics; 0 picks a free one (default: ${DEFAULT-VALUE}).")
    int httpPort;

    /** The earlier name of --http-port, still accepted so that older scripts keep working (--http-port wins when both are given). */
    @Option(names = "--port", hidden = true, paramLabel = "PORT")
    Integer earlierPortName;

    /** What a demo run simulates: its events, its truth, its description and the study's assumption rows. */
    record Simulation(EventFeed feed, TrueEffects truth, String description, String assumptions) {
    }

    private Simulation simulation() {
        return switch (scenarioName.trim().toLowerCase(java.util.Locale.ROOT)) {
            case "rollout" -> {
                RolloutScenario rollout = new RolloutScenario(settings());
                yield new Simulation(new ScenarioFeed(rollout, STUDY), rollout.truth(), rollout.describe(), ROLLOUT_ASSUMPTIONS);
            }
            case "registry" -> new Simulation(new RegistryScenario(STUDY, scenarioOptions.seed()), RegistryScenario.truth(),
                    RegistryScenario.describe(), REGISTRY_ASSUMPTIONS);
            default -> throw new InputError("--scenario must be rollout or registry, was '" + scenarioName + "'");
        };
    }

    @Override
    public Integer call() throws Exception {
        if (earlierPortName != null) {
            spec.commandLine().getErr().println("demo: --port is now called --http-port; please use that name");
            if (!spec.commandLine().getParseResult().hasMatchedOption("--http-port")) {
                httpPort = earlierPortName;
            }
        }
        Simulation scenario = simulation();
        if (!(rate > 0) || Double.isInfinite(rate)) {
            throw new InputError("--rate must be a number of events per second above 0, was " + rate);
        }
        if (duration.isZero()) {
            throw new InputError("--duration must be longer than zero");
        }
        PrintWriter out = spec.commandLine().getOut();
        LatestReports latest = new LatestReports();
        PrometheusMeterRegistry registry = new PrometheusMeterRegistry(PrometheusConfig.DEFAULT);
        // First the port, so a busy one fails before anything else starts.
        try (WebServer web = HttpServing.start(latest, registry, "127.0.0.1", httpPort)) {
            Path dataDir = Files.createTempDirectory("bracket-demo-");
            // The gate closes last, so a Ctrl-C waits for the broker data to be removed too.
            try (ShutdownGate gate = new ShutdownGate("bracket-demo-stop", Duration.ofMinutes(1))) {
                try {
                    out.println("Starting a Kafka broker in this process (a few seconds)...");
                    out.flush();
                    try (EmbeddedBroker broker = EmbeddedBroker.start(dataDir, 0)) {
                        run(scenario, broker, web, latest, gate, out);
                    }
                    out.println("Stopped; the demo's broker data are removed.");
                    out.flush();
                    return 0;
                } finally {
                    deleteTree(dataDir);
                }
            }
        }
    }

    private void run(Simulation scenario, EmbeddedBroker broker, WebServer web, LatestReports latest,
                     ShutdownGate gate, PrintWriter out) throws InterruptedException {
        BracketConfig config = BracketConfig.parse("bracket demo", configYaml(scenario.assumptions()))
                .withBootstrapServers(broker.bootstrapServers());
        try (Monitor monitor = Monitor.start(config, web.registry(), latest);
             Producer<String, String> kafka = DemoProducer.kafkaProducer(broker.bootstrapServers())) {
            MonitorCommand.exitWhenFailed(monitor, spec.commandLine().getErr());
            web.showAlerts(monitor.alerts()::apiView);
            web.showHealth(monitor::liveness, monitor::readiness);
            DemoProducer sender = new DemoProducer(kafka, TOPIC, rate, Clock.systemUTC());
            Thread producerThread = new Thread(() -> sender.run(scenario.feed(),
                    new DemoProducer.Limits(0, duration), gate::stopRequested), "bracket-demo-producer");
            TerminalView view = new TerminalView(out, System.console() != null);
            long start = System.nanoTime();
            producerThread.start();
            while (producerThread.isAlive() && !gate.stopRequested()) {
                view.show(DemoScreen.render(screen(scenario, sender, start, web, latest, monitor)));
                producerThread.join(view.refreshMillis());
            }
            producerThread.join();
            // Let the monitor take in the last events, so the final screen counts all of them.
            long drainUntil = System.nanoTime() + DRAIN_LIMIT.toNanos();
            while (!gate.stopRequested() && System.nanoTime() < drainUntil && reportedUnits(latest) < sender.acknowledged()) {
                Thread.sleep(250);
            }
            view.show(DemoScreen.render(screen(scenario, sender, start, web, latest, monitor)));
            out.printf("%nDemo %s: %,d events sent, %,d in the last report. Stopping the monitor and the broker...%n",
                    gate.stopRequested() ? "interrupted" : "finished", sender.sent(), reportedUnits(latest));
            out.flush();
        }
    }

    private DemoScreen.State screen(Simulation scenario, DemoProducer sender, long startNanos, WebServer web,
                                    LatestReports latest, Monitor monitor) {
        Optional<PublishedReport> report = latest.get(STUDY, "cumulative");
        return new DemoScreen.State(STUDY, scenario.description(), scenario.truth(), sender.sent(),
                Duration.ofNanos(System.nanoTime() - startNanos), duration, web.address(), report, monitor.alerts().firing());
    }

    private static long reportedUnits(LatestReports latest) {
        return latest.get(STUDY, "cumulative").map(r -> r.report().pooled().total()).orElse(0L);
    }

    private ScenarioConfig settings() {
        return scenarioOptions.settings(ScenarioConfig.DEFAULT_HOSTS, ScenarioConfig.DEFAULT_ROLLOUT_SHARE, false,
                spec.commandLine());
    }

    /** The rollout's rows: every single assumption about selection and one joint set. */
    static final String ROLLOUT_ASSUMPTIONS = "[worst-case, mtr-positive, mtr-negative, mts-positive, mts-negative,"
            + " optimizing-selection, sorting-on-gains, \"mtr-negative,mts-positive\"]";

    /** The registry's rows: each with and without missing-at-random, so the difference pending outcomes make shows. */
    static final String REGISTRY_ASSUMPTIONS = "[worst-case, missing-at-random, \"mtr-positive,mts-positive\","
            + " \"mtr-positive,mts-positive,missing-at-random\"]";

    /** The rollout demo's configuration. */
    static String configYaml() {
        return configYaml(ROLLOUT_ASSUMPTIONS);
    }

    /** The demo study: outcomes in [0, 1], higher is better, with the given assumption rows. */
    static String configYaml(String assumptions) {
        return """
                studies:
                  - id: %s
                    outcome: {min: 0, max: 1, better: higher}
                    assume: %s
                inputs:
                  - topic: %s
                topics:
                  rejected: bracket-demo-rejected
                  partials: bracket-demo-partials
                  bounds: bracket-demo-bounds
                alerts:
                  topic: bracket-demo-alerts
                commit-interval: 500ms
                publish-interval: 500ms
                group: bracket-demo
                instance: demo
                """.formatted(STUDY, assumptions, TOPIC);
    }

    private static void deleteTree(Path dir) {
        try (Stream<Path> paths = Files.walk(dir)) {
            paths.sorted(Comparator.reverseOrder()).forEach(p -> p.toFile().delete());
        } catch (IOException e) {
            throw new UncheckedIOException("cannot remove the demo's broker data in " + dir, e);
        }
    }
}
