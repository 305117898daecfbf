package dev.bracket.alerts;

import dev.bracket.alerts.delivery.RecentAlerts;
import java.time.Duration;

/**
 * Settings of the alerting machinery as a whole (the top-level {@code alerts} section).
 *
 * @param topic             the alerts topic (compacted; also the store of alert state)
 * @param checkInterval     how often the per-study rules (stream stalled, data quality) are judged
 * @param recentTransitions how many transitions {@code GET /api/alerts} remembers
 * @param restoreTimeout    how long reading the alerts topic at start may take before the start fails
 */
public record AlertsConfig(String topic, Duration checkInterval, int recentTransitions, Duration restoreTimeout) {

    public static final AlertsConfig DEFAULTS =
            new AlertsConfig("bracket-alerts", Duration.ofSeconds(5), RecentAlerts.DEFAULT_CAPACITY, Duration.ofSeconds(30));

    public AlertsConfig {
        if (topic == null || !topic.matches("[a-zA-Z0-9._-]{1,249}")) {
            throw new IllegalArgumentException("alerts topic must be 1-249 letters, digits, '.', '_' or '-', was '" + topic + "'");
        }
        if (checkInterval == null || checkInterval.isNegative() || checkInterval.isZero()
                || restoreTimeout == null || restoreTimeout.isNegative()
                || restoreTimeout.isZero()) {
            throw new IllegalArgumentException("alerts check-interval and restore-timeout must be positive durations");
        }
        if (recentTransitions < 1) {
            throw new IllegalArgumentException("alerts recent-transitions must be at least 1, was " + recentTransitions);
        }
    }
}
