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
    OUT_OF_RANGE("out-of-range");

    private final String id;

    RejectReason(String id) {
        this.id = id;
    }

    public String id() {
        return id;
    }
}
