package dev.bracket.bounds;

/** Whether an interval could be computed, and if not, why. */
public enum BoundStatus {
    /** The assumptions are compatible with the data and the interval is their identified set. */
    BOUNDED("bounded"),
    /** The assumptions contradict the data: no joint law satisfies them all. */
    REFUTED("refuted"),
    /** An arm (or a stratum or instrument level needed) has no units yet. */
    INSUFFICIENT_DATA("insufficient-data");

    private final String id;

    BoundStatus(String id) {
        this.id = id;
    }

    /** The identifier used in JSON output. */
    public String id() {
        return id;
    }
}
