package dev.bracket.alerts;

import java.time.Duration;
import java.time.Instant;
import java.util.Optional;

/**
 * Fires when a study's stream has been silent for longer than {@code after}; resolves as soon as
 * an event arrives (silence is a fact, not an estimate, so no hysteresis is needed). Judged on a
 * clock, not on updates: a silent stream produces no updates to judge.
 *
 * <p>A restart is no news: silence is measured from the last event known (restored from before
 * the restart), and while the monitor has run for no longer than {@code after} a long silence
 * judges nothing, because events sent while it was down may still wait unread. So a stall firing
 * before the restart stays firing (no resolve/fire pair), and none fires for a backlog.
 */
public record StreamStalledRule(Duration after) {

    public StreamStalledRule {
        if (after == null || after.isNegative() || after.isZero()) {
            throw new IllegalArgumentException("stream-stalled after must be a positive duration, was " + after);
        }
    }

    /**
     * @param lastEventAt when the study's last event arrived, if known (seen since the start, or
     *                    restored); silence counts from {@code upSince} when not
     * @param upSince     when this monitor process started judging
     * @param now         the clock's time
     */
    public Verdict judge(Optional<Instant> lastEventAt, Instant upSince, Instant now) {
        Instant from = lastEventAt.orElse(upSince);
        Duration silent = Duration.between(from, now);
        String seen = (lastEventAt.isPresent() ? "last event " : "no event known; monitor started ")
                + AlertText.duration(silent) + " ago, at " + from + "; limit " + AlertText.duration(after);
        if (silent.compareTo(after) > 0) {
            Duration up = Duration.between(upSince, now);
            return up.compareTo(after) > 0 ? Verdict.met("", seen)
                    : Verdict.unknown(seen + "; the monitor has run for only " + AlertText.duration(up)
                            + " and events may still wait unread");
        }
        return lastEventAt.isPresent() ? Verdict.clear(seen) : Verdict.unknown(seen);
    }

    public Evidence.OfSilence evidence(Optional<Instant> lastEventAt, Instant upSince, Instant now) {
        Instant from = lastEventAt.orElse(upSince);
        return new Evidence.OfSilence(from, Duration.between(from, now), after);
    }
}
