package dev.bracket.alerts;

import java.util.Arrays;
import java.util.Locale;
import java.util.stream.Collectors;

/**
 * The conditions Bracket raises alerts for. The identifiers are a public contract (configuration
 * keys, alert documents, topic keys, metric tags); keep them.
 */
public enum AlertRule {

    /** The confidence band of the ATE lies wholly above or wholly below zero. */
    SIGN_IDENTIFIED("sign-identified", true, "sign of the effect identified", "sign of the effect no longer identified"),
    /** The confidence band is narrower than a configured width. */
    INTERVAL_NARROW("interval-narrow", true, "band narrower than the configured width", "band no longer narrower than the configured width"),
    /** The identified interval and its band lie wholly inside a configured range of practical equivalence. */
    PRACTICAL_EQUIVALENCE("practical-equivalence", true,
            "interval and band inside the range of practical equivalence", "interval or band no longer inside the range of practical equivalence"),
    /** The band for the lower end lies wholly above the band for the upper end: the data contradict the assumptions beyond sampling error. */
    ASSUMPTIONS_REFUTED("assumptions-refuted", true,
            "assumptions contradicted by the data beyond sampling error", "assumptions no longer contradicted beyond sampling error"),
    /** In either arm, the share of units whose outcome has not arrived exceeds a configured limit. */
    PENDING_SHARE("pending-share", true, "share of units with outcomes pending above the limit",
            "shares of units with outcomes pending back within the limit"),
    /** In either arm, more outcomes arrived than units were reported exposed, beyond a configured share. */
    EXCESS_OUTCOMES("excess-outcomes", true, "outcomes beyond the reported exposures",
            "outcomes back within the reported exposures"),
    /** No events arrived for the study for longer than a configured duration. */
    STREAM_STALLED("stream-stalled", false, "no events from the study's stream", "events arriving again"),
    /** The share of rejected events within a period exceeds a configured threshold. */
    DATA_QUALITY("data-quality", false, "rejected share of events above the limit", "rejected share of events back within the limit");

    private final String id;
    private final boolean perRow;
    private final String firingTitle;
    private final String resolvedTitle;

    AlertRule(String id, boolean perRow, String firingTitle, String resolvedTitle) {
        this.id = id;
        this.perRow = perRow;
        this.firingTitle = firingTitle;
        this.resolvedTitle = resolvedTitle;
    }

    /** What a firing transition says, in words. */
    public String firingTitle() {
        return firingTitle;
    }

    /** What a resolving transition says, in words. */
    public String resolvedTitle() {
        return resolvedTitle;
    }

    public String id() {
        return id;
    }

    /**
     * True for rules judged per study × assumption set × window from a band; false for rules
     * judged per study on a clock (their keys carry {@link AlertKey#ANY} for set and window).
     */
    public boolean perRow() {
        return perRow;
    }

    public static AlertRule fromId(String id) {
        String key = id == null ? "" : id.trim().toLowerCase(Locale.ROOT);
        for (AlertRule r : values()) {
            if (r.id.equals(key)) {
                return r;
            }
        }
        throw new IllegalArgumentException("unknown alert rule '" + id + "'; known: " + knownIds());
    }

    public static String knownIds() {
        return Arrays.stream(values()).map(AlertRule::id).collect(Collectors.joining(", "));
    }
}
