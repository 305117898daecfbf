package dev.bracket.config;

import dev.bracket.alerts.AlertRule;
import dev.bracket.alerts.AlertsConfig;
import dev.bracket.alerts.StudyAlertConfig;
import dev.bracket.alerts.WebhookTarget;
import dev.bracket.bands.BandMethod;
import dev.bracket.bounds.Direction;
import dev.bracket.bounds.InstrumentAssumption;
import dev.bracket.bounds.OutcomeKind;
import dev.bracket.config.ConfigKey.Check;
import dev.bracket.config.ConfigKey.Type;

import java.net.URI;
import java.net.URISyntaxException;
import java.time.Duration;
import java.util.Set;
import java.util.regex.Pattern;

/**
 * Every key of the configuration, one line each: name, type, default, check, meaning. One nested
 * class per mapping; its {@code KEYS} are what that mapping allows. To add a key, add its line
 * to the mapping's class and read it in {@link BracketConfig} or {@link AlertConfigReader} with
 * {@code KEY.read(node)}; {@code ConfigKeysReadmeTest} then asks for it in the README's reference.
 * Rules that join several keys (min below max, a sliding step dividing the size, unique ids) stay
 * in the readers.
 */
final class ConfigKeys {

    private static final Pattern NAME = Pattern.compile("[A-Za-z0-9._-]+");

    private ConfigKeys() {
    }

    /** The top level of the configuration file. */
    static final class Top {
        static final ConfigSection KEYS = new ConfigSection();
        static final ConfigKey<ConfigNode> STUDIES = KEYS.required("studies", Type.list(Study.KEYS), "the studies to monitor, at least one");
        static final ConfigKey<ConfigNode> INPUTS = KEYS.key("inputs", Type.list(Input.KEYS), null, "input topics and the event fields each uses (default: bracket-events with the default fields)");
        static final ConfigKey<ConfigNode> TOPICS = KEYS.key("topics", Type.mapping(Topics.KEYS), null, "the topics the monitor writes and how it creates topics");
        static final ConfigKey<ConfigNode> WINDOWS = KEYS.key("windows", Type.list(Window.KEYS), null, "tumbling and sliding windows; cumulative is always kept");
        static final ConfigKey<Duration> GRACE = KEYS.key("grace", Type.DURATION, Duration.ofMinutes(5), d -> d.isNegative() ? "must not be negative" : null, "how late (event time) an event may be and still count in its window pane");
        static final ConfigKey<Double> BAND_LEVEL = KEYS.key("band-level", Type.NUMBER, 0.95, v -> v > 0 && v < 1 ? null : "must lie strictly between 0 and 1, e.g. 0.95", "confidence level of published bands");
        static final ConfigKey<Set<BandMethod>> BANDS = KEYS.key("bands", Type.choice(BandMethod::parseChoice), BandMethod.parseChoice("both"), "which bands to publish: both, fixed, anytime or none");
        static final ConfigKey<Duration> COMMIT_INTERVAL = KEYS.key("commit-interval", Type.DURATION, Duration.ofSeconds(1), Check.positive(), "how often partial statistics and offsets are committed (one transaction)");
        static final ConfigKey<Duration> PUBLISH_INTERVAL = KEYS.key("publish-interval", Type.DURATION, Duration.ofMillis(500), Check.positive(), "least time between two published reports of one study");
        static final ConfigKey<Duration> PROGRESS_INTERVAL = KEYS.key("progress-interval", Type.DURATION, Duration.ofSeconds(10), Check.positive(), "how often the monitor prints a progress line");
        static final ConfigKey<Long> MAX_EVENT_BYTES = KEYS.key("max-event-bytes", Type.WHOLE, 65_536L, v -> v > 16 * 1024 * 1024 ? "must be at most 16777216 (16 MiB)" : null, "larger events are rejected");
        static final ConfigKey<Duration> MAX_CLOCK_SKEW = KEYS.key("max-clock-skew", Type.DURATION, Duration.ofHours(1), Check.positive(), "event times further ahead of the record timestamp or the clock are rejected");
        static final ConfigKey<Duration> DEDUP_HORIZON = KEYS.key("dedup-horizon", Type.DURATION, DedupConfig.DEFAULT.horizon(), d -> d.isNegative() ? "must be from 0 (deduplication by id off) to 36500d, e.g. 24h" : null, "how long (event time) an event id is remembered to reject a repeat; 0 turns it off");
        static final ConfigKey<Long> DEDUP_MAX_IDS = KEYS.key("dedup-max-ids", Type.WHOLE, (long) DedupConfig.DEFAULT.maxIds(), v -> v > 100_000_000 ? "must be at most 100000000 (ids are held in memory, about 200 bytes each), was " + v : null, "most event ids remembered per input partition (earliest counted forgotten first)");
        static final ConfigKey<Long> GROUP_MEMBERS = KEYS.key("group-members", Type.WHOLE, 1L, Check.atMost(64), "aggregation group members this instance runs (each its own consumer and transactions)");
        static final ConfigKey<String> GROUP = KEYS.key("group", Type.TEXT, "bracket", ConfigKeys::name, "consumer group id");
        static final ConfigKey<String> INSTANCE = KEYS.key("instance", Type.TEXT, null, ConfigKeys::name, "a stable name for this instance, its transactional id (default <group>-<host name>)");
        static final ConfigKey<ConfigNode> KAFKA = KEYS.key("kafka", Type.FREE, null, "client properties passed to every Kafka client verbatim");
        static final ConfigKey<ConfigNode> BROKER = KEYS.key("broker", Type.mapping(Broker.KEYS), null, "the embedded broker, used when kafka.bootstrap.servers is absent");
        static final ConfigKey<ConfigNode> ALERTS = KEYS.key("alerts", Type.mapping(Alerts.KEYS), null, "where alert transitions are kept and how often per-study rules are judged");
    }

    /** {@code topics}. */
    static final class Topics {
        static final ConfigSection KEYS = new ConfigSection();
        static final ConfigKey<String> REJECTED = KEYS.key("rejected", Type.TEXT, TopicNames.DEFAULT.rejected(), ConfigKeys::topicName, "rejected events with their reasons");
        static final ConfigKey<String> PARTIALS = KEYS.key("partials", Type.TEXT, TopicNames.DEFAULT.partials(), ConfigKeys::topicName, "per-partition partial statistics (compacted)");
        static final ConfigKey<String> BOUNDS = KEYS.key("bounds", Type.TEXT, TopicNames.DEFAULT.bounds(), ConfigKeys::topicName, "published bound documents");
        static final ConfigKey<Long> PARTITIONS = KEYS.key("partitions", Type.WHOLE, (long) TopicNames.DEFAULT.partitions(), v -> v > 10_000 ? "must be from 1 to 10000, was " + v : null, "partitions of topics the monitor creates");
        static final ConfigKey<Long> REPLICATION = KEYS.key("replication", Type.WHOLE, (long) TopicNames.DEFAULT.replicationFactor(), v -> v > Short.MAX_VALUE ? "must be from 1 to " + Short.MAX_VALUE + " (Kafka's limit), was " + v : null, "replication of topics the monitor creates (default: the broker's)");
    }

    /** {@code broker}. */
    static final class Broker {
        static final ConfigSection KEYS = new ConfigSection();
        static final ConfigKey<String> DATA_DIR = KEYS.key("data-dir", Type.TEXT, null, "state directory (default $XDG_STATE_HOME/bracket/kafka or ~/.local/state/bracket/kafka)");
        static final ConfigKey<Long> PORT = KEYS.key("port", Type.WHOLE, 0L, v -> v > 65_535 ? "must be a TCP port number (1-65535)" : null, "listener port (default: any free port)");
    }

    /** {@code studies[]}. */
    static final class Study {
        static final ConfigSection KEYS = new ConfigSection();
        static final ConfigKey<String> ID = KEYS.required("id", Type.TEXT, "the study's name, unique");
        static final ConfigKey<ConfigNode> OUTCOME = KEYS.required("outcome", Type.mapping(Outcome.KEYS), "the declared range of the outcome");
        static final ConfigKey<InstrumentAssumption> INSTRUMENT = KEYS.key("instrument", Type.choice(InstrumentAssumption::parse), InstrumentAssumption.MEAN_INDEPENDENT, "what is assumed about the instrument levels: mean-independent or independent (binary outcomes)");
        static final ConfigKey<ConfigNode> ASSUME = KEYS.key("assume", Type.FREE, null, "assumption sets, each a list or a comma-separated text (default: each single assumption)");
        static final ConfigKey<ConfigNode> ALERTS = KEYS.key("alerts", Type.mapping(StudyAlerts.KEYS), null, "the study's alert rules and where its alerts go");
        static final ConfigKey<Duration> FOLLOW_UP = KEYS.key("follow-up", Type.DURATION, null, Check.positive(), "how long after exposure a still-pending unit counts as lost to follow-up (absent: never)");
    }

    /** {@code studies[].outcome}. */
    static final class Outcome {
        static final ConfigSection KEYS = new ConfigSection();
        static final ConfigKey<Double> MIN = KEYS.required("min", Type.NUMBER, "lowest possible outcome; declared, never estimated");
        static final ConfigKey<Double> MAX = KEYS.required("max", Type.NUMBER, "highest possible outcome; declared, never estimated");
        static final ConfigKey<Direction> BETTER = KEYS.key("better", Type.choice(Direction::parse), Direction.HIGHER, "which outcomes are better: higher or lower");
        static final ConfigKey<OutcomeKind> KIND = KEYS.key("kind", Type.choice(OutcomeKind::parse), OutcomeKind.BOUNDED, "bounded (anywhere in [min, max]) or binary (only min or max)");
    }

    /** {@code inputs[]}. */
    static final class Input {
        static final ConfigSection KEYS = new ConfigSection();
        static final ConfigKey<String> TOPIC = KEYS.required("topic", Type.TEXT, ConfigKeys::topicName, "an input topic, listed once");
        static final ConfigKey<ConfigNode> FIELDS = KEYS.key("fields", Type.mapping(Fields.KEYS), null, "the JSON fields this topic's events use");
    }

    /** {@code inputs[].fields}: the name of each field in the topic's events. */
    static final class Fields {
        static final ConfigSection KEYS = new ConfigSection();
        static final ConfigKey<String> STUDY = KEYS.key("study", Type.TEXT, FieldMapping.DEFAULT.study(), "the study an event belongs to");
        static final ConfigKey<String> UNIT = KEYS.key("unit", Type.TEXT, FieldMapping.DEFAULT.unit(), "the unit observed");
        static final ConfigKey<String> TREATED = KEYS.key("treated", Type.TEXT, FieldMapping.DEFAULT.treated(), "whether the unit was treated");
        static final ConfigKey<String> OUTCOME = KEYS.key("outcome", Type.TEXT, FieldMapping.DEFAULT.outcome(), "the unit's outcome");
        static final ConfigKey<String> TIME = KEYS.key("time", Type.TEXT, FieldMapping.DEFAULT.time(), "event time");
        static final ConfigKey<String> STRATUM = KEYS.key("stratum", Type.TEXT, FieldMapping.DEFAULT.stratum(), "the unit's stratum, optional");
        static final ConfigKey<String> INSTRUMENT = KEYS.key("instrument", Type.TEXT, FieldMapping.DEFAULT.instrument(), "the unit's instrument level, optional");
        static final ConfigKey<String> ID = KEYS.key("id", Type.TEXT, FieldMapping.DEFAULT.id(), "an event id, optional");
    }

    /** {@code windows[]}. */
    static final class Window {
        static final ConfigSection KEYS = new ConfigSection();
        static final ConfigKey<String> NAME = KEYS.required("name", Type.TEXT, ConfigKeys::name, "the window's name, unique");
        static final ConfigKey<String> KIND = KEYS.required("kind", Type.TEXT, "tumbling or sliding");
        static final ConfigKey<Duration> SIZE = KEYS.required("size", Type.DURATION, Check.positive(), "the window's length");
        static final ConfigKey<Duration> STEP = KEYS.key("step", Type.DURATION, null, Check.positive(), "how far a sliding window moves; divides the size");
    }

    /** {@code alerts} at the top level. */
    static final class Alerts {
        static final ConfigSection KEYS = new ConfigSection();
        static final ConfigKey<String> TOPIC = KEYS.key("topic", Type.TEXT, AlertsConfig.DEFAULTS.topic(), "compacted topic of alert transitions (also creates <topic>-ledger)");
        static final ConfigKey<Duration> CHECK_INTERVAL = KEYS.key("check-interval", Type.DURATION, AlertsConfig.DEFAULTS.checkInterval(), "how often the per-study rules (stream stalled, data quality) are judged");
        static final ConfigKey<Long> RECENT_TRANSITIONS = KEYS.key("recent-transitions", Type.WHOLE, (long) AlertsConfig.DEFAULTS.recentTransitions(), Check.atMost(100_000), "how many transitions GET /api/alerts remembers");
        static final ConfigKey<Duration> RESTORE_TIMEOUT = KEYS.key("restore-timeout", Type.DURATION, AlertsConfig.DEFAULTS.restoreTimeout(), "how long reading the alerts topic at start may take");
    }

    /** {@code studies[].alerts}. */
    static final class StudyAlerts {
        static final ConfigSection KEYS = new ConfigSection();
        static final ConfigKey<BandMethod> BAND = KEYS.key("band", Type.choice(BandMethod::parse), StudyAlertConfig.defaults().band(), "the band the per-row rules judge: anytime or fixed");
        static final ConfigKey<Long> MIN_PER_ARM = KEYS.key("min-per-arm", Type.WHOLE, StudyAlertConfig.DEFAULT_MIN_PER_ARM, "units per arm before any per-row rule may fire");
        static final ConfigKey<Long> CLEAR_AFTER = KEYS.key("clear-after", Type.WHOLE, (long) StudyAlertConfig.DEFAULT_CLEAR_AFTER, Check.atMost(1_000), "consecutive looks without the condition that resolve an alert");
        static final ConfigKey<ConfigNode> RULES = KEYS.key("rules", Type.named(Rules.KEYS), null, "rules by name (absent: sign-identified and assumptions-refuted; {} for none)");
        static final ConfigKey<ConfigNode> WEBHOOKS = KEYS.key("webhooks", Type.list(Webhook.KEYS), null, "receivers of the study's alert transitions");
    }

    /** {@code studies[].alerts.rules}: one entry per rule, named by the rule's id. */
    static final class Rules {
        static final ConfigSection KEYS = new ConfigSection();
        static final ConfigKey<ConfigNode> SIGN_IDENTIFIED = rule(AlertRule.SIGN_IDENTIFIED, SignIdentified.KEYS);
        static final ConfigKey<ConfigNode> INTERVAL_NARROW = rule(AlertRule.INTERVAL_NARROW, IntervalNarrow.KEYS);
        static final ConfigKey<ConfigNode> PRACTICAL_EQUIVALENCE = rule(AlertRule.PRACTICAL_EQUIVALENCE, PracticalEquivalence.KEYS);
        static final ConfigKey<ConfigNode> ASSUMPTIONS_REFUTED = rule(AlertRule.ASSUMPTIONS_REFUTED, AssumptionsRefuted.KEYS);
        static final ConfigKey<ConfigNode> PENDING_SHARE = rule(AlertRule.PENDING_SHARE, PendingShare.KEYS);
        static final ConfigKey<ConfigNode> EXCESS_OUTCOMES = rule(AlertRule.EXCESS_OUTCOMES, ExcessOutcomes.KEYS);
        static final ConfigKey<ConfigNode> STREAM_STALLED = rule(AlertRule.STREAM_STALLED, StreamStalled.KEYS);
        static final ConfigKey<ConfigNode> DATA_QUALITY = rule(AlertRule.DATA_QUALITY, DataQuality.KEYS);

        private static ConfigKey<ConfigNode> rule(AlertRule rule, ConfigSection keys) {
            return KEYS.key(rule.id(), Type.mapping(keys), null, "fires on: " + rule.firingTitle());
        }
    }

    static final class SignIdentified {
        static final ConfigSection KEYS = new ConfigSection();
        static final ConfigKey<Double> CLEAR_ZERO_MARGIN = KEYS.key("clear-zero-margin", Type.NUMBER, 0.0, "resolves at once when 0 lies inside the band by this much on both sides");
    }

    static final class IntervalNarrow {
        static final ConfigSection KEYS = new ConfigSection();
        static final ConfigKey<Double> WIDTH = KEYS.required("width", Type.NUMBER, "fires when the band is narrower than this");
        static final ConfigKey<Double> CLEAR_EXTRA_WIDTH = KEYS.key("clear-extra-width", Type.NUMBER, 0.0, "resolves at once when the band is at least width + this wide");
    }

    static final class PracticalEquivalence {
        static final ConfigSection KEYS = new ConfigSection();
        static final ConfigKey<Double> LOWER = KEYS.required("lower", Type.NUMBER, "lower end of the effects deemed negligible");
        static final ConfigKey<Double> UPPER = KEYS.required("upper", Type.NUMBER, "upper end of the effects deemed negligible");
        static final ConfigKey<Double> CLEAR_OUTSIDE_BY = KEYS.key("clear-outside-by", Type.NUMBER, 0.0, "resolves at once when the band reaches beyond [lower, upper] by more than this");
    }

    static final class AssumptionsRefuted {
        static final ConfigSection KEYS = new ConfigSection();
        static final ConfigKey<Double> CLEAR_MIN_WIDTH = KEYS.key("clear-min-width", Type.NUMBER, 0.0, "resolves at once when the band exists again, at least this wide");
    }

    static final class PendingShare {
        static final ConfigSection KEYS = new ConfigSection();
        static final ConfigKey<Double> MAX_SHARE = KEYS.required("max-share", Type.NUMBER, "fires when an arm's share of exposed units still pending exceeds this");
        static final ConfigKey<Double> CLEAR_SHARE_BELOW = KEYS.key("clear-share-below", Type.NUMBER, 0.0, "resolves at once when the share is at least this far below the limit");
    }

    static final class ExcessOutcomes {
        static final ConfigSection KEYS = new ConfigSection();
        static final ConfigKey<Double> MAX_SHARE = KEYS.key("max-share", Type.NUMBER, 0.0, "fires when an arm's outcomes beyond its exposures exceed this share of its outcomes (0: any)");
        static final ConfigKey<Double> CLEAR_SHARE_BELOW = KEYS.key("clear-share-below", Type.NUMBER, 0.0, "resolves at once when the share is at least this far below the limit");
    }

    static final class StreamStalled {
        static final ConfigSection KEYS = new ConfigSection();
        static final ConfigKey<Duration> AFTER = KEYS.required("after", Type.DURATION, "fires after this long without an event of the study");
    }

    static final class DataQuality {
        static final ConfigSection KEYS = new ConfigSection();
        static final ConfigKey<Double> MAX_REJECTED_SHARE = KEYS.required("max-rejected-share", Type.NUMBER, "fires when the rejected share exceeds this");
        static final ConfigKey<Duration> PERIOD = KEYS.key("period", Type.DURATION, Duration.ofMinutes(10), "the stretch of time the share is counted over");
        static final ConfigKey<Long> MIN_EVENTS = KEYS.key("min-events", Type.WHOLE, 100L, "events in the period before the rule may fire");
        static final ConfigKey<Double> CLEAR_SHARE_BELOW = KEYS.key("clear-share-below", Type.NUMBER, 0.0, "resolves at once when the share is at least this far below the limit");
    }

    /** {@code studies[].alerts.webhooks[]}. */
    static final class Webhook {
        static final ConfigSection KEYS = new ConfigSection();
        static final ConfigKey<URI> URL = KEYS.required("url", Type.choice(ConfigKeys::url), "the receiver");
        static final ConfigKey<String> TOKEN_ENV = KEYS.key("token-env", Type.TEXT, null, "environment variable whose value is sent as Authorization: Bearer <value>");
        static final ConfigKey<Duration> TIMEOUT = KEYS.key("timeout", Type.DURATION, WebhookTarget.DEFAULT_TIMEOUT, "how long one request may take");
        static final ConfigKey<Duration> RETRY_FOR = KEYS.key("retry-for", Type.DURATION, WebhookTarget.DEFAULT_RETRY_FOR, "how long a transition is retried before it is dropped");
        static final ConfigKey<Long> QUEUE = KEYS.key("queue", Type.WHOLE, (long) WebhookTarget.DEFAULT_QUEUE, Check.atMost(1_000_000), "transitions waiting for the receiver before new ones are dropped");
        static final ConfigKey<Duration> BACKOFF_INITIAL = KEYS.key("backoff-initial", Type.DURATION, WebhookTarget.DEFAULT_INITIAL_BACKOFF, "first wait before a retry");
        static final ConfigKey<Duration> BACKOFF_MAX = KEYS.key("backoff-max", Type.DURATION, WebhookTarget.DEFAULT_MAX_BACKOFF, "longest wait between retries");
    }

    private static String name(String s) {
        return NAME.matcher(s).matches() ? null : "may use letters, digits, '.', '_' and '-' only, was '" + s + "'";
    }

    private static String topicName(String s) {
        return NAME.matcher(s).matches() && s.length() <= 249 ? null
                : "must be a Kafka topic name (letters, digits, '.', '_', '-'), was '" + s + "'";
    }

    private static URI url(String text) {
        try {
            return new URI(text);
        } catch (URISyntaxException e) {
            throw new IllegalArgumentException("is not a URL (" + e.getMessage() + ")");
        }
    }
}
