package dev.bracket.alerts;

import java.nio.charset.StandardCharsets;
import java.time.Instant;
import java.util.UUID;

/**
 * One change of an alert: it started firing or it resolved. Immutable; every sink receives the
 * same value and renders it its own way ({@link AlertJson} for machines, {@link LogAlertSink} for people).
 *
 * @param transitionId unique per transition and the same if the same transition is computed again
 *                     after a restart (see {@link #idFor}); receivers use it as an idempotency key
 * @param key          study × assumption set × window × rule
 * @param kind         firing or resolved
 * @param sequence     1 for the key's first transition, then 2, 3, …; odd numbers fire, even ones resolve
 * @param origin       when the key's first transition happened; with the sequence it makes the id unique
 *                     even if a restart had to begin without the previous state
 * @param at           when this transition happened
 * @param variant      which way the condition held ({@code positive}/{@code negative} for the sign), else empty
 * @param summary      one sentence saying what happened and what was seen
 * @param firingSince  when the alert started firing (equal to {@code at} for a firing transition)
 * @param meaning      the assumption set in words; empty for per-study rules
 * @param evidence     the numbers that justify the transition
 */
public record AlertTransition(String transitionId, AlertKey key, TransitionKind kind, long sequence, Instant origin,
                              Instant at, String variant, String summary, Instant firingSince, String meaning,
                              Evidence evidence) {

    public AlertTransition {
        if (transitionId == null || key == null || kind == null || origin == null || at == null
                || summary == null || firingSince == null || evidence == null) {
            throw new IllegalArgumentException("alert transition is missing a field");
        }
        if (sequence < 1) {
            throw new IllegalArgumentException("transition sequence starts at 1, was " + sequence);
        }
        variant = variant == null ? "" : variant;
        meaning = meaning == null ? "" : meaning;
    }

    /**
     * The transition id: a name-based UUID (RFC 4122 version 3) of key, origin and sequence. It
     * is deterministic so that a transition computed again after a crash (state restored, but
     * the transition not yet recorded) reaches receivers under the same idempotency key.
     */
    public static String idFor(AlertKey key, Instant origin, long sequence) {
        String name = "bracket.alert|" + key + "|" + origin + "|" + sequence;
        return UUID.nameUUIDFromBytes(name.getBytes(StandardCharsets.UTF_8)).toString();
    }
}
