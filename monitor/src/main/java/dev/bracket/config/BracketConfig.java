package dev.bracket.config;

import dev.bracket.alerts.AlertOptions;
import dev.bracket.bands.AnytimeBand;
import dev.bracket.bands.BandMethod;
import dev.bracket.bands.BandSettings;
import dev.bracket.bands.VarianceBasis;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.Direction;
import dev.bracket.bounds.InstrumentAssumption;
import dev.bracket.bounds.OutcomeKind;
import dev.bracket.bounds.OutcomeRange;

import java.io.IOException;
import java.net.InetAddress;
import java.net.UnknownHostException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.NoSuchFileException;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.EnumSet;
import java.util.HashSet;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.Set;
import java.util.regex.Pattern;

/**
 * The monitor's configuration, read from YAML. Every rule is checked at load time and a broken
 * one is reported with file, line and column; see {@link #parse}. Key names:
 *
 * <pre>
 * studies:            list of {id, outcome: {min, max, better, kind: bounded|binary},
 *                     instrument: mean-independent|independent, assume: [[ids...], "id,id", ...]}
 * inputs:             list of {topic, fields: {study, unit, treated, outcome, time, stratum, instrument, id}}
 * topics:             {rejected, partials, bounds, partitions, replication}
 * windows:            list of {name, kind: tumbling|sliding, size, step}; "cumulative" is always kept
 * grace:              how late (event time) an event may be and still count in its window pane
 * band-level:         confidence level of published bands
 * bands:              which bands to publish: both (default), fixed, anytime or none
 * commit-interval:    how often partial statistics and offsets are committed (one transaction)
 * publish-interval:   least time between two published reports of one study
 * progress-interval:  how often the monitor prints a progress line
 * max-event-bytes:    larger events are rejected
 * max-clock-skew:     event times further ahead of the record timestamp or the clock are rejected
 * dedup-horizon:      how long (event time) an event id is remembered to reject a repeat; 0 turns it off
 * dedup-max-ids:      most event ids remembered per input partition (earliest counted forgotten first)
 * threads:            aggregation group members this instance runs (each its own consumer and transactions)
 * group, instance:    consumer group id; a stable name for this instance (transactional id; default <group>-<host name>)
 * kafka:              client properties passed to every Kafka client verbatim
 * broker:             {data-dir, port} of the embedded broker used when kafka.bootstrap.servers is absent
 * alerts:             {topic, tick, recent, restore-timeout}; each study's own alerts: see {@link AlertSettings}
 * </pre>
 */
public record BracketConfig(
        String source,
        List<StudyConfig> studies,
        List<InputTopic> inputs,
        TopicNames topics,
        List<WindowSpec> windows,
        Duration grace,
        BandSettings bands,
        Duration commitInterval,
        Duration publishInterval,
        Duration progressInterval,
        int maxEventBytes,
        Duration maxClockSkew,
        DedupSettings dedup,
        int threads,
        String group,
        String instance,
        Map<String, String> kafka,
        Path brokerDataDir,
        int brokerPort,
        AlertOptions alerts) {

    public static final String BOOTSTRAP_SERVERS = "bootstrap.servers";

    /** Most partitions of a topic the monitor creates; beyond any need of one monitor. */
    private static final int MAX_PARTITIONS = 10_000;
    private static final Pattern NAME = Pattern.compile("[A-Za-z0-9._-]+");
    private static final Set<String> TOP_KEYS = Set.of("studies", "inputs", "topics", "windows", "grace", "band-level", "bands",
            "commit-interval", "publish-interval", "progress-interval", "max-event-bytes", "max-clock-skew",
            "dedup-horizon", "dedup-max-ids", "threads", "group", "instance", "kafka", "broker",
            "alerts");

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
        root.onlyKeys(TOP_KEYS);
        List<StudyConfig> studies = studies(root.require("studies"));
        ConfigNode topicsNode = root.get("topics").onlyKeys(Set.of("rejected", "partials", "bounds", "partitions", "replication"));
        TopicNames d = TopicNames.DEFAULT;
        long partitions = topicsNode.get("partitions").positiveLong(d.partitions());
        if (partitions > MAX_PARTITIONS) {
            throw topicsNode.get("partitions").fail("must be from 1 to " + MAX_PARTITIONS + ", was " + partitions);
        }
        long replication = topicsNode.get("replication").positiveLong(d.replicationFactor());
        if (replication > Short.MAX_VALUE) {
            throw topicsNode.get("replication").fail("must be from 1 to " + Short.MAX_VALUE + " (Kafka's limit), was " + replication);
        }
        TopicNames topics = new TopicNames(
                topicName(topicsNode.get("rejected"), d.rejected()),
                topicName(topicsNode.get("partials"), d.partials()),
                topicName(topicsNode.get("bounds"), d.bounds()),
                (int) partitions, (short) replication);
        double bandLevel = root.get("band-level").isMissing() ? 0.95 : root.get("band-level").number();
        if (!(bandLevel > 0 && bandLevel < 1)) {
            throw root.get("band-level").fail("must lie strictly between 0 and 1, e.g. 0.95");
        }
        Set<BandMethod> methods = switch (root.get("bands").text("both")) {
            case "both" -> EnumSet.allOf(BandMethod.class);
            case "fixed" -> EnumSet.of(BandMethod.FIXED_HORIZON);
            case "anytime" -> EnumSet.of(BandMethod.ANYTIME);
            case "none" -> EnumSet.noneOf(BandMethod.class);
            default -> throw root.get("bands").fail("must be both, fixed, anytime or none");
        };
        BandSettings bands = new BandSettings(bandLevel, methods, VarianceBasis.SAMPLE, AnytimeBand.DEFAULT_PLANNED_COUNT);
        long maxBytes = root.get("max-event-bytes").positiveLong(65_536);
        if (maxBytes > 16 * 1024 * 1024) {
            throw root.get("max-event-bytes").fail("must be at most 16777216 (16 MiB)");
        }
        Duration skew = positive(root.get("max-clock-skew"), Duration.ofHours(1));
        DedupSettings dedup = dedup(root);
        Duration commit = positive(root.get("commit-interval"), Duration.ofSeconds(1));
        Duration publish = positive(root.get("publish-interval"), Duration.ofMillis(500));
        Duration progress = positive(root.get("progress-interval"), Duration.ofSeconds(10));
        Duration grace = root.get("grace").duration(Duration.ofMinutes(5));
        if (grace.isNegative()) {
            throw root.get("grace").fail("must not be negative");
        }
        long threads = root.get("threads").positiveLong(1);
        if (threads > 64) {
            throw root.get("threads").fail("must be at most 64");
        }
        ConfigNode broker = root.get("broker").onlyKeys(Set.of("data-dir", "port"));
        long port = broker.get("port").isMissing() ? 0 : broker.get("port").positiveLong(0);
        if (port > 65_535) {
            throw broker.get("port").fail("must be a TCP port number (1-65535)");
        }
        String group = name(root.get("group"), "bracket");
        return new BracketConfig(source, studies, inputs(root.get("inputs")), topics, windows(root.get("windows")), grace,
                bands, commit, publish, progress, (int) maxBytes, skew, dedup, (int) threads,
                group,
                name(root.get("instance"), defaultInstance(group)),
                kafka(root.get("kafka")),
                broker.get("data-dir").isMissing() ? defaultBrokerDir() : expandHome(broker.get("data-dir").text()),
                (int) port, AlertSettings.options(root.get("alerts")));
    }

    private static DedupSettings dedup(ConfigNode root) {
        ConfigNode horizon = root.get("dedup-horizon");
        Duration h = horizon.duration(DedupSettings.DEFAULT.horizon());
        if (h.isNegative() || h.compareTo(Duration.ofDays(36_500)) > 0) {
            throw horizon.fail("must be from 0 (deduplication by id off) to 36500d, e.g. 24h");
        }
        ConfigNode max = root.get("dedup-max-ids");
        long n = max.positiveLong(DedupSettings.DEFAULT.maxIds());
        if (n > 100_000_000) {
            throw max.fail("must be at most 100000000 (ids are held in memory, about 200 bytes each), was " + n);
        }
        return new DedupSettings(h, (int) n);
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
                progressInterval, maxEventBytes, maxClockSkew, dedup, threads, group, instance, k, brokerDataDir, brokerPort, alerts);
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
            s.onlyKeys(Set.of("id", "outcome", "instrument", "assume", "alerts"));
            ConfigNode idNode = s.require("id");
            String id = idNode.text();
            if (!seen.add(id)) {
                throw idNode.fail("repeats the study id '" + id + "'; ids must be unique");
            }
            ConfigNode outcome = s.require("outcome").onlyKeys(Set.of("min", "max", "better", "kind"));
            double min = outcome.require("min").number();
            double max = outcome.require("max").number();
            if (!(min < max)) {
                throw outcome.get("max").fail("must be greater than min (" + min + ")");
            }
            Direction better;
            try {
                better = Direction.parse(outcome.get("better").text("higher"));
            } catch (IllegalArgumentException e) {
                throw outcome.get("better").fail(e.getMessage());
            }
            OutcomeKind kind;
            try {
                kind = OutcomeKind.parse(outcome.get("kind").text("bounded"));
            } catch (IllegalArgumentException e) {
                throw outcome.get("kind").fail(e.getMessage());
            }
            InstrumentAssumption instrument = instrument(s.get("instrument"), kind);
            List<AssumptionSet> sets = assumptions(s.get("assume")).stream().map(set -> set.withInstrument(instrument)).toList();
            out.add(new StudyConfig(id, new OutcomeRange(min, max, better, kind), sets, AlertSettings.study(s.get("alerts"))));
        }
        return out;
    }

    private static InstrumentAssumption instrument(ConfigNode node, OutcomeKind kind) {
        InstrumentAssumption instrument;
        try {
            instrument = InstrumentAssumption.parse(node.text(InstrumentAssumption.MEAN_INDEPENDENT.id()));
        } catch (IllegalArgumentException e) {
            throw node.fail(e.getMessage());
        }
        if (!instrument.supports(kind)) {
            throw node.fail("independent needs a binary outcome: add kind: binary to the study's outcome (every outcome equal to min or max), "
                    + "or use mean-independent");
        }
        return instrument;
    }

    private static List<AssumptionSet> assumptions(ConfigNode node) {
        if (node.isMissing()) {
            return AssumptionSet.eachSingle();
        }
        List<AssumptionSet> sets = new ArrayList<>();
        for (ConfigNode item : node.elements()) {
            String text = item.isArray()
                    ? String.join(",", item.elements().stream().map(ConfigNode::text).toList())
                    : item.text();
            try {
                sets.add(AssumptionSet.parse(text));
            } catch (IllegalArgumentException e) {
                throw item.fail(e.getMessage());
            }
        }
        if (sets.isEmpty()) {
            throw node.fail("must list at least one assumption set, e.g. [[worst-case]]");
        }
        return sets;
    }

    private static List<InputTopic> inputs(ConfigNode node) {
        if (node.isMissing()) {
            return List.of(new InputTopic("bracket-events", FieldMapping.DEFAULT));
        }
        List<InputTopic> out = new ArrayList<>();
        Set<String> seen = new HashSet<>();
        for (ConfigNode item : node.elements()) {
            item.onlyKeys(Set.of("topic", "fields"));
            String topic = topicName(item.require("topic"), null);
            if (!seen.add(topic)) {
                throw item.get("topic").fail("lists the topic '" + topic + "' twice");
            }
            ConfigNode f = item.get("fields").onlyKeys(Set.of("study", "unit", "treated", "outcome", "time", "stratum", "instrument", "id"));
            FieldMapping d = FieldMapping.DEFAULT;
            out.add(new InputTopic(topic, new FieldMapping(
                    f.get("study").text(d.study()), f.get("unit").text(d.unit()), f.get("treated").text(d.treated()),
                    f.get("outcome").text(d.outcome()), f.get("time").text(d.time()), f.get("stratum").text(d.stratum()),
                    f.get("instrument").text(d.instrument()), f.get("id").text(d.id()))));
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
            item.onlyKeys(Set.of("name", "kind", "size", "step"));
            ConfigNode nameNode = item.require("name");
            String name = name(nameNode, null);
            if (!seen.add(name)) {
                throw nameNode.fail("repeats the window name '" + name + "' (cumulative is always present)");
            }
            ConfigNode kindNode = item.require("kind");
            String kind = kindNode.text();
            Duration size = positive(item.require("size"), null);
            switch (kind) {
                case "tumbling" -> {
                    if (!item.get("step").isMissing()) {
                        throw item.get("step").fail("applies to sliding windows only");
                    }
                    out.add(new WindowSpec(name, WindowSpec.Kind.TUMBLING, size, size));
                }
                case "sliding" -> {
                    ConfigNode stepNode = item.require("step");
                    Duration step = positive(stepNode, null);
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

    private static Duration positive(ConfigNode node, Duration fallback) {
        Duration d = node.duration(fallback);
        if (d.isNegative() || d.isZero()) {
            throw node.fail("must be longer than zero");
        }
        return d;
    }

    private static String topicName(ConfigNode node, String fallback) {
        String s = node.text(fallback);
        if (!NAME.matcher(s).matches() || s.length() > 249) {
            throw node.fail("must be a Kafka topic name (letters, digits, '.', '_', '-'), was '" + s + "'");
        }
        return s;
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

    private static String name(ConfigNode node, String fallback) {
        String s = node.text(fallback);
        if (!NAME.matcher(s).matches()) {
            throw node.fail("may use letters, digits, '.', '_' and '-' only, was '" + s + "'");
        }
        return s;
    }
}
