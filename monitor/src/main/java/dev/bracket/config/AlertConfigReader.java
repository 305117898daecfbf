package dev.bracket.config;

import dev.bracket.alerts.AlertsConfig;
import dev.bracket.alerts.AlertRule;
import dev.bracket.alerts.AssumptionsRefutedRule;
import dev.bracket.alerts.RowRule;
import dev.bracket.alerts.DataQualityRule;
import dev.bracket.alerts.IntervalNarrowRule;
import dev.bracket.alerts.ExcessOutcomesRule;
import dev.bracket.alerts.PendingShareRule;
import dev.bracket.alerts.PracticalEquivalenceRule;
import dev.bracket.alerts.SignIdentifiedRule;
import dev.bracket.alerts.StreamStalledRule;
import dev.bracket.alerts.StudyAlertConfig;
import dev.bracket.alerts.WebhookTarget;
import dev.bracket.bands.BandMethod;
import dev.bracket.config.ConfigKeys.Alerts;
import dev.bracket.config.ConfigKeys.AssumptionsRefuted;
import dev.bracket.config.ConfigKeys.DataQuality;
import dev.bracket.config.ConfigKeys.IntervalNarrow;
import dev.bracket.config.ConfigKeys.ExcessOutcomes;
import dev.bracket.config.ConfigKeys.PendingShare;
import dev.bracket.config.ConfigKeys.PracticalEquivalence;
import dev.bracket.config.ConfigKeys.Rules;
import dev.bracket.config.ConfigKeys.SignIdentified;
import dev.bracket.config.ConfigKeys.StreamStalled;
import dev.bracket.config.ConfigKeys.StudyAlerts;
import dev.bracket.config.ConfigKeys.Webhook;

import java.net.URI;
import java.util.ArrayList;
import java.util.List;
import java.util.Optional;
import java.util.function.Supplier;

/**
 * Reads the alert sections: a study's {@code alerts} (rules, thresholds, band, webhooks) and the
 * top-level {@code alerts} (topic, check-interval, recent-transitions, restore-timeout). The keys
 * are defined in {@link ConfigKeys} ({@code StudyAlerts}, {@code Rules} and one class per rule,
 * {@code Webhook}, {@code Alerts}).
 */
final class AlertConfigReader {

    private AlertConfigReader() {
    }

    /** A study's alert settings from its {@code alerts} mapping (keys already checked), defaults when absent. */
    static StudyAlertConfig study(ConfigNode alerts) {
        StudyAlertConfig d = StudyAlertConfig.defaults();
        if (alerts.isMissing()) {
            return d;
        }
        BandMethod band = StudyAlerts.BAND.read(alerts);
        long minPerArm = StudyAlerts.MIN_PER_ARM.read(alerts);
        long clearAfter = StudyAlerts.CLEAR_AFTER.read(alerts);
        List<RowRule> rowRules = new ArrayList<>(d.rowRules());
        Optional<StreamStalledRule> stalled = d.stalled();
        Optional<DataQualityRule> quality = d.quality();
        ConfigNode rules = StudyAlerts.RULES.read(alerts);
        if (!rules.isMissing()) {
            if (!rules.isObject()) {
                throw rules.fail("must be a mapping of rule names (" + AlertRule.knownIds() + ") to their settings");
            }
            rowRules.clear();
            for (String name : rules.keys()) {
                AlertRule rule;
                try {
                    rule = AlertRule.fromId(name);
                } catch (IllegalArgumentException e) {
                    throw rules.fail("names an unknown rule '" + name + "'; known: " + AlertRule.knownIds());
                }
                switch (rule) {
                    case SIGN_IDENTIFIED -> {
                        ConfigNode r = Rules.SIGN_IDENTIFIED.read(rules);
                        rowRules.add(build(r, () -> new SignIdentifiedRule(SignIdentified.CLEAR_ZERO_MARGIN.read(r))));
                    }
                    case INTERVAL_NARROW -> {
                        ConfigNode r = Rules.INTERVAL_NARROW.read(rules);
                        rowRules.add(build(r, () -> new IntervalNarrowRule(IntervalNarrow.WIDTH.read(r),
                                IntervalNarrow.CLEAR_EXTRA_WIDTH.read(r))));
                    }
                    case PRACTICAL_EQUIVALENCE -> {
                        ConfigNode r = Rules.PRACTICAL_EQUIVALENCE.read(rules);
                        rowRules.add(build(r, () -> new PracticalEquivalenceRule(PracticalEquivalence.LOWER.read(r),
                                PracticalEquivalence.UPPER.read(r), PracticalEquivalence.CLEAR_OUTSIDE_BY.read(r))));
                    }
                    case ASSUMPTIONS_REFUTED -> {
                        ConfigNode r = Rules.ASSUMPTIONS_REFUTED.read(rules);
                        rowRules.add(build(r, () -> new AssumptionsRefutedRule(AssumptionsRefuted.CLEAR_MIN_WIDTH.read(r))));
                    }
                    case PENDING_SHARE -> {
                        ConfigNode r = Rules.PENDING_SHARE.read(rules);
                        rowRules.add(build(r, () -> new PendingShareRule(PendingShare.MAX_SHARE.read(r),
                                PendingShare.CLEAR_SHARE_BELOW.read(r))));
                    }
                    case EXCESS_OUTCOMES -> {
                        ConfigNode r = Rules.EXCESS_OUTCOMES.read(rules);
                        rowRules.add(build(r, () -> new ExcessOutcomesRule(ExcessOutcomes.MAX_SHARE.read(r),
                                ExcessOutcomes.CLEAR_SHARE_BELOW.read(r))));
                    }
                    case STREAM_STALLED -> {
                        ConfigNode r = Rules.STREAM_STALLED.read(rules);
                        stalled = Optional.of(build(r, () -> new StreamStalledRule(StreamStalled.AFTER.read(r))));
                    }
                    case DATA_QUALITY -> {
                        ConfigNode r = Rules.DATA_QUALITY.read(rules);
                        quality = Optional.of(build(r, () -> new DataQualityRule(DataQuality.MAX_REJECTED_SHARE.read(r),
                                DataQuality.PERIOD.read(r), DataQuality.MIN_EVENTS.read(r), DataQuality.CLEAR_SHARE_BELOW.read(r))));
                    }
                }
            }
        }
        List<WebhookTarget> webhooks = new ArrayList<>();
        for (ConfigNode w : StudyAlerts.WEBHOOKS.read(alerts).elements()) {
            webhooks.add(webhook(w));
        }
        Optional<StreamStalledRule> stalledRule = stalled;
        Optional<DataQualityRule> qualityRule = quality;
        return build(alerts, () -> new StudyAlertConfig(minPerArm, band, (int) clearAfter, rowRules, stalledRule,
                qualityRule, webhooks));
    }

    /** The top-level {@code alerts} mapping (keys already checked), defaults when absent. */
    static AlertsConfig alertsConfig(ConfigNode node) {
        if (node.isMissing()) {
            return AlertsConfig.DEFAULTS;
        }
        long recent = Alerts.RECENT_TRANSITIONS.read(node);
        return build(node, () -> new AlertsConfig(Alerts.TOPIC.read(node), Alerts.CHECK_INTERVAL.read(node),
                (int) recent, Alerts.RESTORE_TIMEOUT.read(node)));
    }

    private static WebhookTarget webhook(ConfigNode w) {
        Webhook.KEYS.check(w);
        URI url = Webhook.URL.read(w);
        long queue = Webhook.QUEUE.read(w);
        return build(w, () -> new WebhookTarget(url, Webhook.TOKEN_ENV.read(w), Webhook.TIMEOUT.read(w),
                Webhook.RETRY_FOR.read(w), (int) queue, Webhook.BACKOFF_INITIAL.read(w), Webhook.BACKOFF_MAX.read(w)));
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
