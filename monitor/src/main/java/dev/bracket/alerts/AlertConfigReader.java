package dev.bracket.alerts;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.node.JsonNodeFactory;

import java.net.URI;
import java.net.URISyntaxException;
import java.time.Duration;
import java.time.format.DateTimeParseException;
import java.util.ArrayList;
import java.util.Iterator;
import java.util.List;
import java.util.Locale;
import java.util.Optional;
import java.util.Set;
import java.util.TreeSet;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

/**
 * Reads a study's {@code alerts} section (a Jackson tree, from YAML or JSON) into a
 * {@link StudyAlertConfig}. Every error names the offending key by its path and says what is
 * expected; unknown keys are errors, so a misspelt threshold is not silently ignored.
 *
 * <pre>
 * alerts:
 *   band: anytime-valid          # or fixed-horizon
 *   min-per-arm: 30
 *   clear-after: 3
 *   rules:
 *     sign-identified: {clear-margin: 0.005}
 *     interval-narrow: {width: 0.05}
 *     practical-equivalence: {lower: -0.01, upper: 0.01}
 *     assumptions-refuted: {}
 *     stream-stalled: {after: 5m}
 *     data-quality: {max-rejected-share: 0.05, period: 10m, min-events: 100}
 *   webhooks:
 *     - url: https://alerts.example.org/bracket
 *       token-env: BRACKET_WEBHOOK_TOKEN
 * </pre>
 */
public final class AlertConfigReader {

    private static final Pattern SHORT_DURATION = Pattern.compile("(\\d+)\\s*(ms|s|m|h|d)");

    private AlertConfigReader() {
    }

    /**
     * @param alerts the section, or null / missing for a study without one ({@link StudyAlertConfig#defaults()})
     * @param where  its path for error messages, e.g. {@code studies[0].alerts}
     * @throws IllegalArgumentException with a one-line message naming the key and the fix
     */
    public static StudyAlertConfig read(JsonNode alerts, String where) {
        if (alerts == null || alerts.isMissingNode() || alerts.isNull()) {
            return StudyAlertConfig.defaults();
        }
        requireObject(alerts, where, Set.of("band", "min-per-arm", "clear-after", "rules", "webhooks"));
        StudyAlertConfig d = StudyAlertConfig.defaults();
        BandMethod band = alerts.has("band") ? parse(where + ".band", () -> BandMethod.fromId(text(alerts, "band", where))) : d.band();
        long minPerArm = alerts.has("min-per-arm") ? integer(alerts, "min-per-arm", where) : d.minPerArm();
        int clearAfter = alerts.has("clear-after") ? (int) integer(alerts, "clear-after", where) : d.clearAfter();

        List<CellRule> cellRules = new ArrayList<>(d.cellRules());
        Optional<StreamStalledRule> stalled = Optional.empty();
        Optional<DataQualityRule> quality = Optional.empty();
        if (alerts.has("rules")) {
            cellRules.clear();
            JsonNode rules = alerts.get("rules");
            String at = where + ".rules";
            if (!rules.isObject()) {
                throw new IllegalArgumentException(at + ": expected a map of rule names (" + AlertRule.knownIds() + ") to settings");
            }
            for (Iterator<String> names = rules.fieldNames(); names.hasNext(); ) {
                String name = names.next();
                JsonNode r = rules.get(name).isNull() ? JsonNodeFactory.instance.objectNode() : rules.get(name);
                String rw = at + "." + name;
                AlertRule rule = parse(rw, () -> AlertRule.fromId(name));
                switch (rule) {
                    case SIGN_IDENTIFIED -> {
                        requireObject(r, rw, Set.of("clear-margin"));
                        cellRules.add(parse(rw, () -> new SignIdentifiedRule(number(r, "clear-margin", rw, 0))));
                    }
                    case INTERVAL_NARROW -> {
                        requireObject(r, rw, Set.of("width", "clear-margin"));
                        cellRules.add(parse(rw, () -> new IntervalNarrowRule(number(r, "width", rw, Double.NaN),
                                number(r, "clear-margin", rw, 0))));
                    }
                    case PRACTICAL_EQUIVALENCE -> {
                        requireObject(r, rw, Set.of("lower", "upper", "clear-margin"));
                        cellRules.add(parse(rw, () -> new PracticalEquivalenceRule(number(r, "lower", rw, Double.NaN),
                                number(r, "upper", rw, Double.NaN), number(r, "clear-margin", rw, 0))));
                    }
                    case ASSUMPTIONS_REFUTED -> {
                        requireObject(r, rw, Set.of("clear-margin"));
                        cellRules.add(parse(rw, () -> new AssumptionsRefutedRule(number(r, "clear-margin", rw, 0))));
                    }
                    case STREAM_STALLED -> {
                        requireObject(r, rw, Set.of("after"));
                        stalled = Optional.of(parse(rw, () -> new StreamStalledRule(duration(r, "after", rw, null))));
                    }
                    case DATA_QUALITY -> {
                        requireObject(r, rw, Set.of("max-rejected-share", "period", "min-events", "clear-margin"));
                        quality = Optional.of(parse(rw, () -> new DataQualityRule(number(r, "max-rejected-share", rw, Double.NaN),
                                duration(r, "period", rw, Duration.ofMinutes(10)),
                                r.has("min-events") ? integer(r, "min-events", rw) : 100, number(r, "clear-margin", rw, 0))));
                    }
                }
            }
        }
        List<WebhookTarget> webhooks = new ArrayList<>();
        if (alerts.has("webhooks")) {
            JsonNode list = alerts.get("webhooks");
            if (!list.isArray()) {
                throw new IllegalArgumentException(where + ".webhooks: expected a list of {url: ..., token-env: ...}");
            }
            for (int i = 0; i < list.size(); i++) {
                webhooks.add(webhook(list.get(i), where + ".webhooks[" + i + "]"));
            }
        }
        Optional<StreamStalledRule> stalledRule = stalled;
        Optional<DataQualityRule> qualityRule = quality;
        return parse(where, () -> new StudyAlertConfig(minPerArm, band, clearAfter, cellRules, stalledRule, qualityRule,
                webhooks));
    }

    /**
     * Reads the top-level {@code alerts} section ({@code topic}, {@code tick}, {@code recent},
     * {@code restore-timeout}); missing keys keep their defaults ({@link AlertOptions#DEFAULTS}).
     */
    public static AlertOptions readOptions(JsonNode node, String where) {
        if (node == null || node.isMissingNode() || node.isNull()) {
            return AlertOptions.DEFAULTS;
        }
        requireObject(node, where, Set.of("topic", "tick", "recent", "restore-timeout"));
        AlertOptions d = AlertOptions.DEFAULTS;
        return parse(where, () -> new AlertOptions(node.has("topic") ? text(node, "topic", where) : d.topic(),
                duration(node, "tick", where, d.tick()),
                node.has("recent") ? (int) integer(node, "recent", where) : d.recent(),
                duration(node, "restore-timeout", where, d.restoreTimeout())));
    }

    private static WebhookTarget webhook(JsonNode w, String where) {
        requireObject(w, where, Set.of("url", "token-env", "timeout", "retry-for", "queue", "backoff-initial", "backoff-max"));
        if (!w.has("url")) {
            throw new IllegalArgumentException(where + ".url: missing; give the receiver's http(s) URL");
        }
        URI url;
        try {
            url = new URI(text(w, "url", where));
        } catch (URISyntaxException e) {
            throw new IllegalArgumentException(where + ".url: not a URL (" + e.getMessage() + ")");
        }
        String tokenEnv = w.has("token-env") ? text(w, "token-env", where) : null;
        int queue = w.has("queue") ? (int) integer(w, "queue", where) : WebhookTarget.DEFAULT_QUEUE;
        return parse(where, () -> new WebhookTarget(url, tokenEnv,
                duration(w, "timeout", where, WebhookTarget.DEFAULT_TIMEOUT),
                duration(w, "retry-for", where, WebhookTarget.DEFAULT_RETRY_FOR), queue,
                duration(w, "backoff-initial", where, WebhookTarget.DEFAULT_INITIAL_BACKOFF),
                duration(w, "backoff-max", where, WebhookTarget.DEFAULT_MAX_BACKOFF)));
    }

    /**
     * A duration written {@code 500ms}, {@code 30s}, {@code 5m}, {@code 2h}, {@code 1d} or in
     * ISO-8601 ({@code PT5M}).
     */
    public static Duration parseDuration(String text) {
        String t = text == null ? "" : text.trim().toLowerCase(Locale.ROOT);
        Matcher m = SHORT_DURATION.matcher(t);
        if (m.matches()) {
            long n = Long.parseLong(m.group(1));
            return switch (m.group(2)) {
                case "ms" -> Duration.ofMillis(n);
                case "s" -> Duration.ofSeconds(n);
                case "m" -> Duration.ofMinutes(n);
                case "h" -> Duration.ofHours(n);
                default -> Duration.ofDays(n);
            };
        }
        try {
            return Duration.parse(t.toUpperCase(Locale.ROOT));
        } catch (DateTimeParseException e) {
            throw new IllegalArgumentException("'" + text + "' is not a duration; write e.g. 500ms, 30s, 5m, 2h, 1d or PT5M");
        }
    }

    private interface Build<T> {
        T get();
    }

    /** Runs a constructor and prefixes its complaint with the path. */
    private static <T> T parse(String where, Build<T> build) {
        try {
            return build.get();
        } catch (IllegalArgumentException e) {
            if (e.getMessage() != null && e.getMessage().startsWith(where)) {
                throw e; // already names a key at or below this path
            }
            throw new IllegalArgumentException(where + ": " + e.getMessage(), e);
        }
    }

    private static void requireObject(JsonNode node, String where, Set<String> known) {
        if (!node.isObject()) {
            throw new IllegalArgumentException(where + ": expected a map with keys " + String.join(", ", new TreeSet<>(known)));
        }
        for (Iterator<String> it = node.fieldNames(); it.hasNext(); ) {
            String key = it.next();
            if (!known.contains(key)) {
                throw new IllegalArgumentException(where + "." + key + ": unknown key; known here: "
                        + String.join(", ", new TreeSet<>(known)));
            }
        }
    }

    private static String text(JsonNode node, String key, String where) {
        JsonNode v = node.get(key);
        if (v == null || !v.isTextual() || v.asText().isBlank()) {
            throw new IllegalArgumentException(where + "." + key + ": expected text");
        }
        return v.asText().trim();
    }

    private static double number(JsonNode node, String key, String where, double absent) {
        JsonNode v = node.get(key);
        if (v == null) {
            if (Double.isNaN(absent)) {
                throw new IllegalArgumentException(where + "." + key + ": missing; this rule needs it");
            }
            return absent;
        }
        if (!v.isNumber()) {
            throw new IllegalArgumentException(where + "." + key + ": expected a number, was '" + v.asText() + "'");
        }
        return v.asDouble();
    }

    private static long integer(JsonNode node, String key, String where) {
        JsonNode v = node.get(key);
        if (v == null || !v.isIntegralNumber()) {
            throw new IllegalArgumentException(where + "." + key + ": expected a whole number, was '" + (v == null ? "" : v.asText()) + "'");
        }
        return v.asLong();
    }

    private static Duration duration(JsonNode node, String key, String where, Duration absent) {
        JsonNode v = node.get(key);
        if (v == null) {
            if (absent == null) {
                throw new IllegalArgumentException(where + "." + key + ": missing; write a duration such as 5m");
            }
            return absent;
        }
        return parse(where + "." + key, () -> parseDuration(v.asText()));
    }
}
