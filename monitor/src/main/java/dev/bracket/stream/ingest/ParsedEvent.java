package dev.bracket.stream.ingest;

import dev.bracket.config.StudyConfig;

/**
 * The usable part of one event, or why it is unusable. Mutable and reused by the parser across
 * records so that the hot path allocates little; copy what must outlive the next parse.
 */
public final class ParsedEvent {

    StudyConfig study;
    int studyIndex;
    boolean treated;
    double outcome;
    boolean exposure;
    long time;
    long exposedTime;
    String stratum;
    String instrument;
    String id;
    RejectReason rejection;
    String detail;

    /**
     * The configured study the event names; for a rejected event too when its study field could
     * be read (wrong type elsewhere, missing field, out of range), null when it could not.
     */
    public StudyConfig study() {
        return study;
    }

    /**
     * The study's position in the list the parser was made with (counting per study without a
     * lookup); -1 when {@link #study()} is null.
     */
    public int studyIndex() {
        return studyIndex;
    }

    public boolean treated() {
        return treated;
    }

    public double outcome() {
        return outcome;
    }

    /** True for an exposure event (a unit entered an arm; no outcome), false for an outcome event. */
    public boolean isExposure() {
        return exposure;
    }

    /**
     * For an outcome event, when its unit was exposed (epoch milliseconds), if the event says so;
     * {@link Long#MIN_VALUE} otherwise. Windows place the outcome by this time when present.
     */
    public long exposedTime() {
        return exposedTime;
    }

    /** Event time in epoch milliseconds (the record timestamp when the event has none). */
    public long time() {
        return time;
    }

    /** The stratum, or {@code ""} when the event names none. */
    public String stratum() {
        return stratum;
    }

    /** The instrument level, or {@code ""} when the event names none. */
    public String instrument() {
        return instrument;
    }

    /** The event's own identifier as text (a number as written), or null when it has none. */
    public String id() {
        return id;
    }

    /** Null for a usable event. */
    public RejectReason rejection() {
        return rejection;
    }

    /** What exactly was wrong, in one line; null for a usable event. */
    public String detail() {
        return detail;
    }

    public boolean isUsable() {
        return rejection == null;
    }

    public void reset() {
        study = null;
        studyIndex = -1;
        treated = false;
        outcome = Double.NaN;
        exposure = false;
        time = Long.MIN_VALUE;
        exposedTime = Long.MIN_VALUE;
        stratum = null;
        instrument = null;
        id = null;
        rejection = null;
        detail = null;
    }

    ParsedEvent reject(RejectReason reason, String why) {
        rejection = reason;
        detail = why;
        return this;
    }
}
