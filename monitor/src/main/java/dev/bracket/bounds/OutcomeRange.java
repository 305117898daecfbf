package dev.bracket.bounds;

/**
 * The declared range [min, max] of the outcome and which end is better. The range is a
 * modelling declaration made per study (it is never estimated from the data): every bound in
 * this package is only valid if no outcome can fall outside it.
 */
public record OutcomeRange(double min, double max, Direction better) {

    public OutcomeRange {
        if (!Double.isFinite(min) || !Double.isFinite(max)) {
            throw new IllegalArgumentException("outcome range ends must be finite numbers (min=" + min + ", max=" + max + ")");
        }
        if (!(min < max)) {
            throw new IllegalArgumentException("outcome range needs min < max (min=" + min + ", max=" + max + ")");
        }
        if (better == null) {
            throw new IllegalArgumentException("outcome direction is required");
        }
    }

    public OutcomeRange(double min, double max) {
        this(min, max, Direction.HIGHER);
    }

    /** {@code max - min}: the width of every worst-case interval. */
    public double width() {
        return max - min;
    }

    /** True when {@code y} lies in [min, max]. */
    public boolean contains(double y) {
        return y >= min && y <= max;
    }

    /**
     * How far two computed means may cross before that counts as a contradiction rather than
     * rounding: 1e-9 of the size of the range ends. Means that are equal in exact arithmetic
     * (3 of 12 and 1 of 4 binary outcomes) differ in the last bits when accumulated by Welford's
     * update, and that must not refute an assumption.
     */
    double roundingSlack() {
        return 1e-9 * (Math.abs(min) + Math.abs(max));
    }

    /** The reflected outcome {@code min + max - y}; maps the range onto itself with the order reversed. */
    public double reflect(double y) {
        return min + max - y;
    }
}
