package dev.bracket.config;

import dev.bracket.alerts.AlertsConfig;
import dev.bracket.bands.AnytimeBand;
import dev.bracket.bands.BandMethod;
import dev.bracket.bands.BandConfig;
import dev.bracket.bands.VarianceBasis;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.Direction;
import dev.bracket.bounds.InstrumentAssumption;
import dev.bracket.bounds.OutcomeKind;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.config.ConfigKeys.Broker;
import dev.bracket.config.ConfigKeys.Fields;
import dev.bracket.config.ConfigKeys.Input;
import dev.bracket.config.ConfigKeys.Outcome;
import dev.bracket.config.ConfigKeys.Study;
import dev.bracket.config.ConfigKeys.Top;
import dev.bracket.config.ConfigKeys.Topics;
import dev.bracket.config.ConfigKeys.Window;

import java.io.IOException;
import java.net.InetAddress;
import java.net.UnknownHostException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.NoSuchFileException;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.Set;

/**
 * The monitor's configuration, read from YAML. Every rule is checked at load time and a broken
 * one is reported with file, line and column; see {@link #parse}. The keys, with their types,
 * defaults, checks and meanings, are defined in {@link ConfigKeys}; the README's configuration
 * reference names the same keys (a test holds them equal).
 */
public record BracketConfig(
        String source,
        List<StudyConfig> studies,
        List<InputTopic> inputs,
        TopicNames topics,
        List<WindowSpec> windows,
        Duration grace,
        BandConfig bands,
        Duration commitInterval,
        Duration publishInterval,
        Duration progressInterval,
        int maxEventBytes,
        Duration maxClockSkew,
        DedupConfig dedup,
        int groupMembers,
        String group,
        String instance,
        Map<String, String> kafka,
        Path brokerDataDir,
        int brokerPort,
        AlertsConfig alerts) {

    public static final String BOOTSTRAP_SERVERS = "bootstrap.servers";


    public BracketConfig {
        studies = List.copyOf(studies);
        inputs = List.copyOf(inputs);
        windows = List.copyOf(windows);
        kafka = Map.copyOf(kafka);
    }

    /** Reads and checks a configuration file. */
    public static BracketConfig load(Path file) {
        try {
            return parse(file.toString(), Files.readString(file, StandardCharsets.UTF_8));
        } catch (NoSuchFileException e) {
            throw new ConfigError(file + ": no such configuration file");
        } catch (IOException e) {
            throw new ConfigError(file + ": cannot read (" + e.getMessage() + ")");
        }
    }

    /** Parses and checks configuration text; {@code source} names it in error messages. */
    public static BracketConfig parse(String source, String text) {
        ConfigNode root = YamlDocument.parse(source, text).root();
        if (root.isMissing()) {
            throw new ConfigError(source + ": empty configuration; it needs at least a 'studies' list");
        }
        Top.KEYS.check(root);
        List<StudyConfig> studies = studies(Top.STUDIES.read(root));
        ConfigNode topicsNode = Top.TOPICS.read(root);
        long partitions = Topics.PARTITIONS.read(topicsNode);
        long replication = Topics.REPLICATION.read(topicsNode);
        TopicNames topics = new TopicNames(Topics.REJECTED.read(topicsNode), Topics.PARTIALS.read(topicsNode),
                Topics.BOUNDS.read(topicsNode), (int) partitions, (short) replication);
        double bandLevel = Top.BAND_LEVEL.read(root);
        Set<BandMethod> methods = Top.BANDS.read(root);
        BandConfig bands = new BandConfig(bandLevel, methods, VarianceBasis.SAMPLE, AnytimeBand.DEFAULT_PLANNED_COUNT);
        long maxBytes = Top.MAX_EVENT_BYTES.read(root);
        Duration skew = Top.MAX_CLOCK_SKEW.read(root);
        DedupConfig dedup = new DedupConfig(Top.DEDUP_HORIZON.read(root), Top.DEDUP_MAX_IDS.read(root).intValue());
        Duration commit = Top.COMMIT_INTERVAL.read(root);
        Duration publish = Top.PUBLISH_INTERVAL.read(root);
        Duration progress = Top.PROGRESS_INTERVAL.read(root);
        Duration grace = Top.GRACE.read(root);
        long groupMembers = Top.GROUP_MEMBERS.read(root);
        ConfigNode broker = Top.BROKER.read(root);
        long port = Broker.PORT.read(broker);
        String group = Top.GROUP.read(root);
        List<InputTopic> inputs = inputs(Top.INPUTS.read(root));
        List<WindowSpec> windows = windows(Top.WINDOWS.read(root));
        String instance = Top.INSTANCE.read(root);
        Map<String, String> kafka = kafka(Top.KAFKA.read(root));
        String dataDir = Broker.DATA_DIR.read(broker);
        return new BracketConfig(source, studies, inputs, topics, windows, grace, bands, commit, publish, progress,
                (int) maxBytes, skew, dedup, (int) groupMembers, group, instance == null ? defaultInstance(group) : instance, kafka,
                dataDir == null ? defaultBrokerDir() : expandHome(dataDir), (int) port,
                AlertConfigReader.alertsConfig(Top.ALERTS.read(root)));
    }

    /** True when no broker is configured and the monitor runs its own. */
    public boolean usesEmbeddedBroker() {
        return !kafka.containsKey(BOOTSTRAP_SERVERS);
    }

    /** This configuration pointed at the given broker address. */
    public BracketConfig withBootstrapServers(String servers) {
        Map<String, String> k = new LinkedHashMap<>(kafka);
        k.put(BOOTSTRAP_SERVERS, servers);
        return new BracketConfig(source, studies, inputs, topics, windows, grace, bands, commitInterval, publishInterval,
                progressInterval, maxEventBytes, maxClockSkew, dedup, groupMembers, group, instance, k, brokerDataDir, brokerPort, alerts);
    }

    /** Confidence level of the published bands. */
    public double bandLevel() {
        return bands.level();
    }

    public Optional<StudyConfig> study(String id) {
        return studies.stream().filter(s -> s.id().equals(id)).findFirst();
    }

    /** The state directory of the embedded broker: {@code $XDG_STATE_HOME/bracket/kafka} or {@code ~/.local/state/bracket/kafka}. */
    static Path defaultBrokerDir() {
        String xdg = System.getenv("XDG_STATE_HOME");
        Path base = xdg != null && !xdg.isBlank() ? Path.of(xdg) : Path.of(System.getProperty("user.home"), ".local", "state");
        return base.resolve("bracket").resolve("kafka");
    }

    private static Path expandHome(String path) {
        return path.startsWith("~/") ? Path.of(System.getProperty("user.home"), path.substring(2)) : Path.of(path);
    }

    private static List<StudyConfig> studies(ConfigNode list) {
        List<ConfigNode> items = list.elements();
        if (items.isEmpty()) {
            throw list.fail("must list at least one study");
        }
        List<StudyConfig> out = new ArrayList<>();
        Set<String> seen = new HashSet<>();
        for (ConfigNode s : items) {
            Study.KEYS.check(s);
            String id = Study.ID.read(s);
            if (!seen.add(id)) {
                throw Study.ID.node(s).fail("repeats the study id '" + id + "'; ids must be unique");
            }
            ConfigNode outcome = Study.OUTCOME.read(s);
            double min = Outcome.MIN.read(outcome);
            double max = Outcome.MAX.read(outcome);
            if (!(min < max)) {
                throw Outcome.MAX.node(outcome).fail("must be greater than min (" + min + ")");
            }
            Direction better = Outcome.BETTER.read(outcome);
            OutcomeKind kind = Outcome.KIND.read(outcome);
            InstrumentAssumption instrument = instrument(s, kind);
            List<AssumptionSet> sets = assumptions(Study.ASSUME.read(s)).stream().map(set -> set.withInstrument(instrument)).toList();
            out.add(new StudyConfig(id, new OutcomeRange(min, max, better, kind), sets, AlertConfigReader.study(Study.ALERTS.read(s)),
                    Study.FOLLOW_UP.read(s)));
        }
        return out;
    }

    private static InstrumentAssumption instrument(ConfigNode study, OutcomeKind kind) {
        InstrumentAssumption instrument = Study.INSTRUMENT.read(study);
        if (!instrument.supports(kind)) {
            throw Study.INSTRUMENT.node(study).fail("independent needs a binary outcome: add kind: binary to the study's outcome (every outcome equal to min or max), "
                    + "or use mean-independent");
        }
        return instrument;
    }

    private static List<AssumptionSet> assumptions(ConfigNode node) {
        if (node.isMissing()) {
            return AssumptionSet.eachSingle();
        }
        List<ConfigNode> items = node.elements();
        if (items.isEmpty()) {
            throw node.fail("must list at least one assumption set, e.g. [[worst-case]]");
        }
        List<String> texts = items.stream()
                .map(item -> item.isArray() ? String.join(",", item.elements().stream().map(ConfigNode::text).toList()) : item.text())
                .toList();
        try {
            return AssumptionSet.parseAll(texts);
        } catch (AssumptionSet.BadEntry e) {
            throw items.get(e.index()).fail(e.getMessage());
        }
    }

    private static List<InputTopic> inputs(ConfigNode node) {
        if (node.isMissing()) {
            return List.of(new InputTopic("bracket-events", FieldMapping.DEFAULT));
        }
        List<InputTopic> out = new ArrayList<>();
        Set<String> seen = new HashSet<>();
        for (ConfigNode item : node.elements()) {
            Input.KEYS.check(item);
            String topic = Input.TOPIC.read(item);
            if (!seen.add(topic)) {
                throw Input.TOPIC.node(item).fail("lists the topic '" + topic + "' twice");
            }
            ConfigNode f = Input.FIELDS.read(item);
            out.add(new InputTopic(topic, new FieldMapping(Fields.STUDY.read(f), Fields.UNIT.read(f), Fields.TREATED.read(f),
                    Fields.OUTCOME.read(f), Fields.TIME.read(f), Fields.STRATUM.read(f), Fields.INSTRUMENT.read(f), Fields.ID.read(f))));
        }
        if (out.isEmpty()) {
            throw node.fail("must list at least one input topic");
        }
        return out;
    }

    private static List<WindowSpec> windows(ConfigNode node) {
        List<WindowSpec> out = new ArrayList<>();
        out.add(WindowSpec.CUMULATIVE);
        Set<String> seen = new HashSet<>(Set.of(WindowSpec.CUMULATIVE.name()));
        for (ConfigNode item : node.elements()) {
            Window.KEYS.check(item);
            String name = Window.NAME.read(item);
            if (!seen.add(name)) {
                throw Window.NAME.node(item).fail("repeats the window name '" + name + "' (cumulative is always present)");
            }
            String kind = Window.KIND.read(item);
            ConfigNode kindNode = Window.KIND.node(item);
            Duration size = Window.SIZE.read(item);
            switch (kind) {
                case "tumbling" -> {
                    if (!Window.STEP.node(item).isMissing()) {
                        throw Window.STEP.node(item).fail("applies to sliding windows only");
                    }
                    out.add(new WindowSpec(name, WindowSpec.Kind.TUMBLING, size, size));
                }
                case "sliding" -> {
                    ConfigNode stepNode = item.require(Window.STEP.name());
                    Duration step = Window.STEP.read(item);
                    if (size.toMillis() % step.toMillis() != 0 || step.compareTo(size) > 0) {
                        throw stepNode.fail("must divide the size (" + size + ") evenly; a sliding window is made of whole steps");
                    }
                    if (size.toMillis() / step.toMillis() > 1_000) {
                        throw stepNode.fail("is too small: a window may span at most 1000 steps");
                    }
                    out.add(new WindowSpec(name, WindowSpec.Kind.SLIDING, size, step));
                }
                default -> throw kindNode.fail("must be 'tumbling' or 'sliding', was '" + kind + "' (cumulative is always present)");
            }
        }
        return out;
    }

    private static Map<String, String> kafka(ConfigNode node) {
        Map<String, String> out = new LinkedHashMap<>();
        if (node.isMissing()) {
            return out;
        }
        if (!node.isObject()) {
            throw node.fail("must be a mapping of Kafka client properties, e.g. bootstrap.servers: host:9092");
        }
        for (String key : node.keys()) {
            out.put(key, node.get(key).text());
        }
        return out;
    }

    /**
     * {@code <group>-<host name>}: stable across restarts on one machine, so a restarted monitor
     * takes over (and aborts) its predecessor's open transaction at once instead of waiting for
     * the transaction timeout. Two monitors of one group on one machine need their own {@code instance}.
     */
    static String defaultInstance(String group) {
        String host;
        try {
            host = InetAddress.getLocalHost().getHostName();
        } catch (UnknownHostException e) {
            host = System.getenv().getOrDefault("HOSTNAME", "localhost");
        }
        String clean = host.replaceAll("[^A-Za-z0-9._-]", "-");
        return group + "-" + (clean.isEmpty() ? "localhost" : clean);
    }
}
