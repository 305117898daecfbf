package dev.bracket.stream.ingest;

/**
 * Why an event could not be used. The identifier travels in the rejected record's
 * {@code bracket.reason} header and in the {@code reason} tag of
 * {@code bracket_events_rejected_total}; keep the identifiers stable.
 */
public enum RejectReason {
    TOO_LARGE("too-large"),
    BAD_JSON("bad-json"),
    MISSING_FIELD("missing-field"),
    WRONG_TYPE("wrong-type"),
    UNKNOWN_STUDY("unknown-study"),
    OUT_OF_RANGE("out-of-range"),
    /** Inside the range of a study declaring a binary outcome, but neither of its two ends. */
    NOT_BINARY("not-binary"),
    /** A time outside years 1 to 9999, or a number too large for epoch milliseconds. */
    TIME_UNREPRESENTABLE("time-unrepresentable"),
    /** A time later than {@code max-clock-skew} ahead of the record timestamp or the clock. */
    TIME_TOO_FAR_AHEAD("time-too-far-ahead"),
    /** An event whose (study, id) was already counted within {@code dedup-horizon}: a producer's retry. */
    DUPLICATE("duplicate"),
    /** Reading the event failed in a way no other reason describes; the detail names the failure. */
    UNREADABLE("unreadable");

    private final String id;

    RejectReason(String id) {
        this.id = id;
    }

    public String id() {
        return id;
    }
}
