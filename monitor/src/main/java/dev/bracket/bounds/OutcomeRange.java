package dev.bracket.bounds;

/**
 * The declared range [min, max] of the outcome, which end is better, and whether outcomes can
 * lie anywhere in the range or only at its two ends ({@link OutcomeKind}). The range is a
 * modelling declaration made per study (it is never estimated from the data): every bound in
 * this package is only valid if no outcome can fall outside it.
 */
public record OutcomeRange(double min, double max, Direction better, OutcomeKind kind) {

    public OutcomeRange {
        if (!Double.isFinite(min) || !Double.isFinite(max)) {
            throw new IllegalArgumentException("outcome range ends must be finite numbers (min=" + min + ", max=" + max + ")");
        }
        if (!(min < max)) {
            throw new IllegalArgumentException("outcome range needs min < max (min=" + min + ", max=" + max + ")");
        }
        if (better == null || kind == null) {
            throw new IllegalArgumentException("outcome direction and kind are required");
        }
    }

    /** A range of {@link OutcomeKind#BOUNDED} outcomes. */
    public OutcomeRange(double min, double max, Direction better) {
        this(min, max, better, OutcomeKind.BOUNDED);
    }

    public OutcomeRange(double min, double max) {
        this(min, max, Direction.HIGHER);
    }

    /** The same range with outcomes of the given kind. */
    public OutcomeRange withKind(OutcomeKind newKind) {
        return new OutcomeRange(min, max, better, newKind);
    }

    /** {@code max - min}: the width of every worst-case interval. */
    public double width() {
        return max - min;
    }

    /** True when {@code y} lies in [min, max]. */
    public boolean contains(double y) {
        return y >= min && y <= max;
    }

    /** True when {@code y} is a possible outcome: in [min, max], and for binary outcomes equal to min or max. */
    public boolean admits(double y) {
        return kind == OutcomeKind.BINARY ? y == min || y == max : contains(y);
    }

    /** {@code (y - min) / (max - min)}: the outcome on the unit scale, 0 at min and 1 at max. */
    public double toUnit(double y) {
        return (y - min) / width();
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
