package dev.bracket.config;

import dev.bracket.alerts.AlertsConfig;
import dev.bracket.alerts.AlertRule;
import dev.bracket.alerts.AssumptionsRefutedRule;
import dev.bracket.alerts.RowRule;
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
import java.util.List;
import java.util.Optional;
import java.util.Set;
import java.util.function.Supplier;

/**
 * Reads the alert sections: a study's {@code alerts} (rules, thresholds, band, webhooks) and the
 * top-level {@code alerts} (topic, check-interval, recent-transitions, restore-timeout). Keys:
 *
 * <pre>
 * studies[i].alerts:
 *   band: anytime | fixed      (default anytime)
 *   min-per-arm: 30                    units per arm before any per-row rule may fire
 *   clear-after: 3                     consecutive looks without the condition that resolve an alert
 *   rules:                             (absent: sign-identified and assumptions-refuted; {} for none)
 *     sign-identified: {clear-zero-margin}
 *     interval-narrow: {width, clear-extra-width}
 *     practical-equivalence: {lower, upper, clear-outside-by}
 *     assumptions-refuted: {clear-min-width}
 *     pending-share: {max-share, clear-share-below}
 *     stream-stalled: {after}
 *     data-quality: {max-rejected-share, period (10m), min-events (100), clear-share-below}
 *   webhooks: [{url, token-env, timeout (5s), retry-for (15m), queue (1000), backoff-initial (500ms), backoff-max (60s)}]
 * alerts:
 *   topic: bracket-alerts   check-interval: 5s   recent-transitions: 200   restore-timeout: 30s
 * </pre>
 */
final class AlertConfigReader {

    private static final Set<String> STUDY_KEYS = Set.of("band", "min-per-arm", "clear-after", "rules", "webhooks");
    private static final Set<String> WEBHOOK_KEYS =
            Set.of("url", "token-env", "timeout", "retry-for", "queue", "backoff-initial", "backoff-max");

    private AlertConfigReader() {
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
        List<RowRule> rowRules = new ArrayList<>(d.rowRules());
        Optional<StreamStalledRule> stalled = d.stalled();
        Optional<DataQualityRule> quality = d.quality();
        ConfigNode rules = alerts.get("rules");
        if (!rules.isMissing()) {
            if (!rules.isObject()) {
                throw rules.fail("must be a mapping of rule names (" + AlertRule.knownIds() + ") to their settings");
            }
            rowRules.clear();
            for (String name : rules.keys()) {
                ConfigNode r = rules.get(name);
                AlertRule rule;
                try {
                    rule = AlertRule.fromId(name);
                } catch (IllegalArgumentException e) {
                    throw rules.fail("names an unknown rule '" + name + "'; known: " + AlertRule.knownIds());
                }
                switch (rule) {
                    case SIGN_IDENTIFIED -> rowRules.add(build(r.onlyKeys(Set.of("clear-zero-margin")),
                            () -> new SignIdentifiedRule(number(r.get("clear-zero-margin"), 0))));
                    case INTERVAL_NARROW -> rowRules.add(build(r.onlyKeys(Set.of("width", "clear-extra-width")),
                            () -> new IntervalNarrowRule(r.require("width").number(), number(r.get("clear-extra-width"), 0))));
                    case PRACTICAL_EQUIVALENCE -> rowRules.add(build(r.onlyKeys(Set.of("lower", "upper", "clear-outside-by")),
                            () -> new PracticalEquivalenceRule(r.require("lower").number(), r.require("upper").number(),
                                    number(r.get("clear-outside-by"), 0))));
                    case ASSUMPTIONS_REFUTED -> rowRules.add(build(r.onlyKeys(Set.of("clear-min-width")),
                            () -> new AssumptionsRefutedRule(number(r.get("clear-min-width"), 0))));
                    case PENDING_SHARE -> rowRules.add(build(r.onlyKeys(Set.of("max-share", "clear-share-below")),
                            () -> new PendingShareRule(r.require("max-share").number(), number(r.get("clear-share-below"), 0))));
                    case STREAM_STALLED -> stalled = Optional.of(build(r.onlyKeys(Set.of("after")),
                            () -> new StreamStalledRule(r.require("after").duration(null))));
                    case DATA_QUALITY -> quality = Optional.of(build(
                            r.onlyKeys(Set.of("max-rejected-share", "period", "min-events", "clear-share-below")),
                            () -> new DataQualityRule(r.require("max-rejected-share").number(),
                                    r.get("period").duration(Duration.ofMinutes(10)), r.get("min-events").positiveLong(100),
                                    number(r.get("clear-share-below"), 0))));
                }
            }
        }
        List<WebhookTarget> webhooks = new ArrayList<>();
        for (ConfigNode w : alerts.get("webhooks").elements()) {
            webhooks.add(webhook(w));
        }
        Optional<StreamStalledRule> stalledRule = stalled;
        Optional<DataQualityRule> qualityRule = quality;
        return build(alerts, () -> new StudyAlertConfig(minPerArm, band, (int) clearAfter, rowRules, stalledRule,
                qualityRule, webhooks));
    }

    static AlertsConfig alertsConfig(ConfigNode node) {
        AlertsConfig d = AlertsConfig.DEFAULTS;
        if (node.isMissing()) {
            return d;
        }
        node.onlyKeys(Set.of("topic", "check-interval", "recent-transitions", "restore-timeout"));
        long recent = node.get("recent-transitions").positiveLong(d.recentTransitions());
        if (recent > 100_000) {
            throw node.get("recent-transitions").fail("must be at most 100000");
        }
        return build(node, () -> new AlertsConfig(node.get("topic").text(d.topic()), node.get("check-interval").duration(d.checkInterval()),
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
        try {
            return BandMethod.parse(node.text());
        } catch (IllegalArgumentException e) {
            throw node.fail(e.getMessage());
        }
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
