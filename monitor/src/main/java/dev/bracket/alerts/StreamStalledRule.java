package dev.bracket.alerts;

import java.time.Duration;
import java.time.Instant;

/**
 * Fires when a study's stream has been silent for longer than {@code after}; resolves as soon as
 * an event arrives (silence is a fact, not an estimate, so no hysteresis is needed). Judged on a
 * clock, not on updates: a silent stream produces no updates to judge.
 */
public record StreamStalledRule(Duration after) {

    public StreamStalledRule {
        if (after == null || after.isNegative() || after.isZero()) {
            throw new IllegalArgumentException("stream-stalled after must be a positive duration, was " + after);
        }
    }

    /**
     * @param lastEventAt when the study's last event arrived (the monitor's start if none has)
     * @param now         the clock's time
     */
    public Verdict judge(Instant lastEventAt, Instant now) {
        Duration silent = Duration.between(lastEventAt, now);
        String seen = "last event " + AlertText.duration(silent) + " ago, at " + lastEventAt
                + "; limit " + AlertText.duration(after);
        return silent.compareTo(after) > 0 ? Verdict.met("", seen) : Verdict.clear(seen);
    }

    public Evidence.OfSilence evidence(Instant lastEventAt, Instant now) {
        return new Evidence.OfSilence(lastEventAt, Duration.between(lastEventAt, now), after);
    }
}
