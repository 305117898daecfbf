package dev.bracket.bands;

import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.OutcomeRange;

/**
 * Where the bands take each arm's outcome spread from: the observed spread, or, when no standard
 * deviation is known, the largest spread outcomes in the declared range allow.
 */
public enum VarianceBasis {
    /**
     * The arm's sample variance (divisor n - 1), from observations or from a given standard
     * deviation. An arm with a single unit has none; the range bound stands in for it.
     */
    SAMPLE("the arms' sample standard deviations"),
    /**
     * No standard deviation is known: every arm's variance is taken at its largest possible value
     * for outcomes in [a, b], {@code (b - a)^2 / 4} (Popoviciu 1935, "Sur les équations algébriques
     * ayant toutes leurs racines réelles", Mathematica 9). Never too small, often too large.
     */
    RANGE_BOUND("variance at most (b-a)^2/4 for outcomes in [a, b], since no standard deviation was given");

    private final String description;

    VarianceBasis(String description) {
        this.description = description;
    }

    /** What stands in for the arms' spread, in plain words. */
    public String description() {
        return description;
    }

    /** The variance used for one arm. */
    double variance(ArmStatistics arm, OutcomeRange range) {
        if (this == SAMPLE && arm.count() >= 2) {
            return arm.variance();
        }
        return rangeBound(range);
    }

    /**
     * The arm's sum of squared deviations from its mean, M2, for the anytime band. Without a known
     * spread: the Bhatia–Davis bound {@code M2 <= n (mean - a)(b - mean)} (Bhatia &amp; Davis 2000,
     * "A better bound on the variance", Amer. Math. Monthly 107(4)), applied to the sample's own
     * distribution, which never falls below the true M2 of outcomes in [a, b].
     */
    double m2(ArmStatistics arm, OutcomeRange range) {
        if (this == SAMPLE || arm.isEmpty()) {
            return arm.m2();
        }
        return arm.count() * Math.max(0, arm.mean() - range.min()) * Math.max(0, range.max() - arm.mean());
    }

    /** Popoviciu's bound {@code (b - a)^2 / 4}. */
    static double rangeBound(OutcomeRange range) {
        return range.width() * range.width() / 4;
    }
}
