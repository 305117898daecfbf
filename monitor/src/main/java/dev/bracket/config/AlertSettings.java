package dev.bracket.config;

import dev.bracket.alerts.AlertOptions;
import dev.bracket.alerts.AlertRule;
import dev.bracket.alerts.AssumptionsRefutedRule;
import dev.bracket.alerts.CellRule;
import dev.bracket.alerts.DataQualityRule;
import dev.bracket.alerts.IntervalNarrowRule;
import dev.bracket.alerts.PendingShareRule;
import dev.bracket.alerts.PracticalEquivalenceRule;
import dev.bracket.alerts.SignIdentifiedRule;
import dev.bracket.alerts.StreamStalledRule;
import dev.bracket.alerts.StudyAlertConfig;
import dev.bracket.alerts.WebhookTarget;
import dev.bracket.bands.BandMethod;

import java.net.URI;
import java.net.URISyntaxException;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Optional;
import java.util.Set;
import java.util.function.Supplier;
import java.util.stream.Collectors;

/**
 * Reads the alert sections: a study's {@code alerts} (rules, thresholds, band, webhooks) and the
 * top-level {@code alerts} (topic, tick, recent, restore-timeout). Keys:
 *
 * <pre>
 * studies[i].alerts:
 *   band: anytime | fixed      (default anytime)
 *   min-per-arm: 30                    units per arm before any per-cell rule may fire
 *   clear-after: 3                     consecutive looks without the condition that resolve an alert
 *   rules:                             (absent: sign-identified and assumptions-refuted; {} for none)
 *     sign-identified: {clear-margin}
 *     interval-narrow: {width, clear-margin}
 *     practical-equivalence: {lower, upper, clear-margin}
 *     assumptions-refuted: {clear-margin}
 *     pending-share: {max-share, clear-margin}
 *     stream-stalled: {after}
 *     data-quality: {max-rejected-share, period (10m), min-events (100), clear-margin}
 *   webhooks: [{url, token-env, timeout (5s), retry-for (15m), queue (1000), backoff-initial (500ms), backoff-max (60s)}]
 * alerts:
 *   topic: bracket-alerts   tick: 5s   recent: 200   restore-timeout: 30s
 * </pre>
 */
final class AlertSettings {

    private static final Set<String> STUDY_KEYS = Set.of("band", "min-per-arm", "clear-after", "rules", "webhooks");
    private static final Set<String> WEBHOOK_KEYS =
            Set.of("url", "token-env", "timeout", "retry-for", "queue", "backoff-initial", "backoff-max");

    private AlertSettings() {
    }

    static StudyAlertConfig study(ConfigNode alerts) {
        StudyAlertConfig d = StudyAlertConfig.defaults();
        if (alerts.isMissing()) {
            return d;
        }
        alerts.onlyKeys(STUDY_KEYS);
        BandMethod band = alerts.get("band").isMissing() ? d.band() : bandMethod(alerts.get("band"));
        long minPerArm = alerts.get("min-per-arm").positiveLong(d.minPerArm());
        long clearAfter = alerts.get("clear-after").positiveLong(d.clearAfter());
        if (clearAfter > 1_000) {
            throw alerts.get("clear-after").fail("must be at most 1000");
        }
        List<CellRule> cellRules = new ArrayList<>(d.cellRules());
        Optional<StreamStalledRule> stalled = d.stalled();
        Optional<DataQualityRule> quality = d.quality();
        ConfigNode rules = alerts.get("rules");
        if (!rules.isMissing()) {
            if (!rules.isObject()) {
                throw rules.fail("must be a mapping of rule names (" + AlertRule.knownIds() + ") to their settings");
            }
            cellRules.clear();
            for (String name : rules.keys()) {
                ConfigNode r = rules.get(name);
                AlertRule rule;
                try {
                    rule = AlertRule.fromId(name);
                } catch (IllegalArgumentException e) {
                    throw rules.fail("names an unknown rule '" + name + "'; known: " + AlertRule.knownIds());
                }
                switch (rule) {
                    case SIGN_IDENTIFIED -> cellRules.add(build(r.onlyKeys(Set.of("clear-margin")),
                            () -> new SignIdentifiedRule(number(r.get("clear-margin"), 0))));
                    case INTERVAL_NARROW -> cellRules.add(build(r.onlyKeys(Set.of("width", "clear-margin")),
                            () -> new IntervalNarrowRule(r.require("width").number(), number(r.get("clear-margin"), 0))));
                    case PRACTICAL_EQUIVALENCE -> cellRules.add(build(r.onlyKeys(Set.of("lower", "upper", "clear-margin")),
                            () -> new PracticalEquivalenceRule(r.require("lower").number(), r.require("upper").number(),
                                    number(r.get("clear-margin"), 0))));
                    case ASSUMPTIONS_REFUTED -> cellRules.add(build(r.onlyKeys(Set.of("clear-margin")),
                            () -> new AssumptionsRefutedRule(number(r.get("clear-margin"), 0))));
                    case PENDING_SHARE -> cellRules.add(build(r.onlyKeys(Set.of("max-share", "clear-margin")),
                            () -> new PendingShareRule(r.require("max-share").number(), number(r.get("clear-margin"), 0))));
                    case STREAM_STALLED -> stalled = Optional.of(build(r.onlyKeys(Set.of("after")),
                            () -> new StreamStalledRule(r.require("after").duration(null))));
                    case DATA_QUALITY -> quality = Optional.of(build(
                            r.onlyKeys(Set.of("max-rejected-share", "period", "min-events", "clear-margin")),
                            () -> new DataQualityRule(r.require("max-rejected-share").number(),
                                    r.get("period").duration(Duration.ofMinutes(10)), r.get("min-events").positiveLong(100),
                                    number(r.get("clear-margin"), 0))));
                }
            }
        }
        List<WebhookTarget> webhooks = new ArrayList<>();
        for (ConfigNode w : alerts.get("webhooks").elements()) {
            webhooks.add(webhook(w));
        }
        Optional<StreamStalledRule> stalledRule = stalled;
        Optional<DataQualityRule> qualityRule = quality;
        return build(alerts, () -> new StudyAlertConfig(minPerArm, band, (int) clearAfter, cellRules, stalledRule,
                qualityRule, webhooks));
    }

    static AlertOptions options(ConfigNode node) {
        AlertOptions d = AlertOptions.DEFAULTS;
        if (node.isMissing()) {
            return d;
        }
        node.onlyKeys(Set.of("topic", "tick", "recent", "restore-timeout"));
        long recent = node.get("recent").positiveLong(d.recent());
        if (recent > 100_000) {
            throw node.get("recent").fail("must be at most 100000");
        }
        return build(node, () -> new AlertOptions(node.get("topic").text(d.topic()), node.get("tick").duration(d.tick()),
                (int) recent, node.get("restore-timeout").duration(d.restoreTimeout())));
    }

    private static WebhookTarget webhook(ConfigNode w) {
        w.onlyKeys(WEBHOOK_KEYS);
        ConfigNode urlNode = w.require("url");
        URI url;
        try {
            url = new URI(urlNode.text());
        } catch (URISyntaxException e) {
            throw urlNode.fail("is not a URL (" + e.getMessage() + ")");
        }
        long queue = w.get("queue").positiveLong(WebhookTarget.DEFAULT_QUEUE);
        if (queue > 1_000_000) {
            throw w.get("queue").fail("must be at most 1000000");
        }
        return build(w, () -> new WebhookTarget(url, w.get("token-env").text(null),
                w.get("timeout").duration(WebhookTarget.DEFAULT_TIMEOUT),
                w.get("retry-for").duration(WebhookTarget.DEFAULT_RETRY_FOR), (int) queue,
                w.get("backoff-initial").duration(WebhookTarget.DEFAULT_INITIAL_BACKOFF),
                w.get("backoff-max").duration(WebhookTarget.DEFAULT_MAX_BACKOFF)));
    }

    private static BandMethod bandMethod(ConfigNode node) {
        String id = node.text();
        return Arrays.stream(BandMethod.values()).filter(m -> m.id().equals(id)).findFirst()
                .orElseThrow(() -> node.fail("must be one of " + Arrays.stream(BandMethod.values()).map(BandMethod::id)
                        .collect(Collectors.joining(", ")) + ", was '" + id + "'"));
    }

    private static double number(ConfigNode node, double fallback) {
        return node.isMissing() ? fallback : node.number();
    }

    /** Runs a constructor; its complaint about a value becomes an error located at {@code node}. */
    private static <T> T build(ConfigNode node, Supplier<T> constructor) {
        try {
            return constructor.get();
        } catch (IllegalArgumentException e) {
            throw node.fail("is not usable: " + e.getMessage());
        }
    }
}
