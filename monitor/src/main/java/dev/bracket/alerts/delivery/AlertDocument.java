package dev.bracket.alerts.delivery;

import dev.bracket.alerts.TransitionKind;
import dev.bracket.alerts.AlertTransition;
import dev.bracket.alerts.AlertState;
import dev.bracket.alerts.AlertKey;
import java.time.Instant;

/**
 * One transition as its JSON document (the text sinks send), with the fields a restart reads
 * back from it. Built from a live transition ({@link #of}) or from a record of the alerts topic
 * ({@link AlertJson#document}); a resumed webhook delivery sends the stored text unchanged, so
 * the receiver sees the same body under the same idempotency key.
 *
 * @param sequence the key's transition number (odd fires, even resolves)
 * @param variant  which way a firing condition held; empty for resolutions
 * @param text     the {@value AlertJson#SCHEMA} document
 */
public record AlertDocument(String transitionId, AlertKey key, TransitionKind kind, long sequence, String variant,
                            Instant origin, Instant at, String text) {

    public static AlertDocument of(AlertTransition t) {
        return new AlertDocument(t.transitionId(), t.key(), t.kind(), t.sequence(), t.variant(), t.origin(), t.at(),
                AlertJson.toText(t));
    }

    /** The state this transition leaves its key in (see {@link AlertState#after}). */
    public AlertState state() {
        boolean firing = kind == TransitionKind.FIRING;
        return new AlertState(key, firing, firing ? variant : "", sequence, origin, at, 0);
    }
}
