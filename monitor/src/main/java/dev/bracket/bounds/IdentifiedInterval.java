package dev.bracket.bounds;

/**
 * The identified set of the average treatment effect under some assumptions: [lower, upper]
 * when the status is {@link BoundStatus#BOUNDED}. For the other statuses the ends are
 * {@code NaN} and must not be read; use {@link #isBounded()} first.
 */
public record IdentifiedInterval(double lower, double upper, BoundStatus status) {

    public IdentifiedInterval {
        if (status == BoundStatus.BOUNDED && !(lower <= upper)) {
            throw new IllegalArgumentException("identified interval needs lower <= upper (" + lower + ", " + upper + ")");
        }
    }

    public static IdentifiedInterval of(double lower, double upper) {
        return new IdentifiedInterval(lower, upper, BoundStatus.BOUNDED);
    }

    /** The interval between two ends given in either order: rounding can cross ends that are equal in exact arithmetic. */
    public static IdentifiedInterval spanning(double end, double otherEnd) {
        return of(Math.min(end, otherEnd), Math.max(end, otherEnd));
    }

    public static IdentifiedInterval refuted() {
        return new IdentifiedInterval(Double.NaN, Double.NaN, BoundStatus.REFUTED);
    }

    public static IdentifiedInterval insufficientData() {
        return new IdentifiedInterval(Double.NaN, Double.NaN, BoundStatus.INSUFFICIENT_DATA);
    }

    public boolean isBounded() {
        return status == BoundStatus.BOUNDED;
    }

    /** {@code upper - lower}; NaN unless identified. */
    public double width() {
        return upper - lower;
    }

    /** True when the whole interval lies strictly above or strictly below zero. */
    public boolean excludesZero() {
        return isBounded() && (lower > 0 || upper < 0);
    }

    /** +1 when the interval lies above zero, -1 below, 0 when it contains zero or is not identified. */
    public int identifiedSign() {
        if (!isBounded()) {
            return 0;
        }
        return lower > 0 ? 1 : upper < 0 ? -1 : 0;
    }
}
