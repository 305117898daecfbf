package dev.bracket.demo;

import dev.bracket.duration.DurationText;
import org.apache.kafka.clients.producer.Producer;
import picocli.CommandLine;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;

import java.io.IOException;
import java.io.InputStream;
import java.io.PrintWriter;
import java.nio.file.Files;
import java.nio.file.NoSuchFileException;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.util.Optional;
import java.util.concurrent.Callable;

/** Sends the simulated rollout (or a file of JSON lines) to the outcomes topic. */
@Command(name = "demo-producer",
        mixinStandardHelpOptions = true,
        description = {
                "Sends outcome events of an invented rollout to Kafka, or the lines of a JSON-lines file.",
                "On-call engineers turn a new setting on for hosts they choose, so comparing hosts with and without it is biased. "
                        + "The simulation knows both potential outcomes of every host-interval and prints the true effect at the start."},
        footer = {"", "The scenario and its numbers are invented for demonstration."})
public final class DemoProducerCommand implements Callable<Integer> {

    /** The topic the monitor reads outcomes from unless configured otherwise. */
    public static final String DEFAULT_TOPIC = "bracket-events";
    public static final String DEFAULT_STUDY = "host-rollout";

    @CommandLine.Spec
    CommandLine.Model.CommandSpec spec;

    @Option(names = "--bootstrap-servers", paramLabel = "HOST:PORT[,...]", defaultValue = "localhost:9092",
            description = "Kafka brokers to contact (default: ${DEFAULT-VALUE}).")
    String bootstrapServers;

    @Option(names = "--topic", paramLabel = "TOPIC", defaultValue = DEFAULT_TOPIC, description = "Topic to send to (default: ${DEFAULT-VALUE}).")
    String topic;

    @Option(names = "--study", paramLabel = "ID", defaultValue = DEFAULT_STUDY, description = "Study identifier put in every simulated event (default: ${DEFAULT-VALUE}).")
    String study;

    @Option(names = "--rate", paramLabel = "EVENTS_PER_S", defaultValue = "200",
            description = "Events per second; 0 sends as fast as possible (default: ${DEFAULT-VALUE}).")
    double rate;

    @Option(names = "--duration", paramLabel = "TIME", converter = DurationText.Converter.class,
            description = "Stop after this long, e.g. 90s or 10m. With --count too, whichever comes first"
                    + " (default: no limit; without either the producer runs until Ctrl-C or the file ends).")
    Duration duration;

    @Option(names = "--count", paramLabel = "N", description = "Stop after N events. With --duration too, whichever comes first (default: no limit).")
    long count;

    @CommandLine.Mixin
    ScenarioOptions scenarioOptions;

    @Option(names = "--hosts", paramLabel = "N", defaultValue = "" + ScenarioConfig.DEFAULT_HOSTS,
            description = "Hosts in the simulated service (default: ${DEFAULT-VALUE}).")
    int hosts;

    @Option(names = "--rollout-share", paramLabel = "P", defaultValue = "" + ScenarioConfig.DEFAULT_ROLLOUT_SHARE,
            description = "Share of hosts that get the setting (default: ${DEFAULT-VALUE}).")
    double rolloutShare;

    @Option(names = "--strata", description = "Put each host's region in the events' stratum field.")
    boolean strata;

    @Option(names = "--from-file", paramLabel = "FILE", description = "Send this file's JSON lines instead of simulating ('-' reads standard input).")
    String fromFile;

    @Override
    public Integer call() throws Exception {
        PrintWriter out = spec.commandLine().getOut();
        if (count < 0) {
            throw new CommandLine.ParameterException(spec.commandLine(), "--count must be >= 0, was " + count);
        }
        if (!(rate >= 0) || Double.isInfinite(rate)) {
            throw new CommandLine.ParameterException(spec.commandLine(), "--rate must be a number >= 0, was " + rate);
        }
        DemoProducer.Limits limits = new DemoProducer.Limits(count, duration);
        if (fromFile != null) {
            try (JsonlFileFeed feed = new JsonlFileFeed(openFile())) {
                out.printf("Sending the lines of %s to topic %s at %s.%n", fromFile, topic, bootstrapServers);
                out.flush();
                int code = send(feed, limits);
                if (feed.malformed() > 0) {
                    spec.commandLine().getErr().printf("warning: %d line(s) were not JSON objects (first: line %d of %s); "
                            + "they were sent and the monitor will reject them with the reason.%n",
                            feed.malformed(), feed.firstMalformedLine(), fromFile);
                }
                return code;
            }
        }
        RolloutScenario scenario = new RolloutScenario(scenario());
        out.printf("Sending study '%s' to topic %s at %s.%n", study, topic, bootstrapServers);
        out.println(scenario.describe());
        out.println("Truth of this simulation (real data never show it): " + scenario.truth().describe() + ".");
        out.flush();
        return send(new ScenarioFeed(scenario, study), limits);
    }

    private ScenarioConfig scenario() {
        return scenarioOptions.settings(hosts, rolloutShare, strata, spec.commandLine());
    }

    private InputStream openFile() throws IOException {
        if (fromFile.equals("-")) {
            return System.in;
        }
        try {
            return Files.newInputStream(Path.of(fromFile));
        } catch (NoSuchFileException e) {
            throw new CommandLine.ParameterException(spec.commandLine(), "--from-file: no such file '" + fromFile + "'");
        }
    }

    /**
     * Sends until done or Ctrl-C; a Ctrl-C still flushes what was handed to the producer. Brokers
     * that cannot be reached end it at once, brokers that stop answering within about
     * {@link DemoProducer#ANSWER_TIMEOUT}: one line, exit code 1.
     */
    private int send(EventFeed feed, DemoProducer.Limits limits) {
        PrintWriter err = spec.commandLine().getErr();
        Optional<String> down = BootstrapCheck.unreachable(bootstrapServers, DemoProducer.ANSWER_TIMEOUT);
        if (down.isPresent()) {
            err.println("demo-producer: cannot reach Kafka: " + down.get() + "; start the broker or correct --bootstrap-servers");
            return 1;
        }
        DemoProducer sender;
        try (ShutdownGate gate = new ShutdownGate("bracket-producer-stop", Duration.ofMinutes(1));
             Producer<String, String> producer = DemoProducer.kafkaProducer(bootstrapServers)) {
            sender = new DemoProducer(producer, topic, rate, Clock.systemUTC());
            sender.run(feed, limits, gate::stopRequested);
        }
        PrintWriter out = spec.commandLine().getOut();
        out.printf("Sent %d events; the broker acknowledged %d, refused %d.%n", sender.sent(), sender.acknowledged(), sender.failed());
        out.flush();
        if (sender.unanswered()) {
            err.printf("demo-producer: Kafka at %s stopped answering (no reply within %d s: %s); sending stopped%n",
                    bootstrapServers, DemoProducer.ANSWER_TIMEOUT.toSeconds(), sender.firstFailure().getMessage());
            return 1;
        }
        if (sender.failed() > 0) {
            err.println("first failure: " + sender.firstFailure());
            return 1;
        }
        return 0;
    }

    /** Standalone entry point, for running the producer without the rest of Bracket. */
    public static void main(String[] args) {
        CommandLine cl = new CommandLine(new DemoProducerCommand());
        cl.setParameterExceptionHandler((e, a) -> {
            e.getCommandLine().getErr().println(e.getCommandLine().getCommandName() + ": " + e.getMessage());
            e.getCommandLine().getErr().println("Try '" + e.getCommandLine().getCommandName() + " --help'.");
            return CommandLine.ExitCode.USAGE;
        });
        System.exit(cl.execute(args));
    }
}
