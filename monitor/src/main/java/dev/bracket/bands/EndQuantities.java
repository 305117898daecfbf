package dev.bracket.bands;

import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.BoundCalculator;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.bounds.UnobservedMeans;

import java.util.Optional;

/**
 * The per-unit quantities whose means are the two ends of the identified interval, for assumption
 * sets where such quantities exist. By {@link BoundCalculator} the lower end is
 * {@code p (mu1 - m01High) + (1 - p)(m10Low - mu0)}. When every bound on a counterfactual mean is
 * either an end of the range or the same arm's observed mean (worst case, monotone response,
 * optimizing selection and their combinations), each term is the mean of a per-unit quantity:
 * {@code p (mu1 - b) = E[T (Y - b)]}, {@code p (mu1 - mu1) = 0}, {@code (1 - p)(a - mu0) =
 * E[(1 - T)(a - Y)]}. So the lower end is {@code E[T g1(Y) + (1 - T) g0(Y)]} with affine
 * {@code g1, g0}; for the worst case {@code T (Y - b) + (1 - T)(a - Y)}, likewise the upper end.
 *
 * <p>Because the same quantity applies in every stratum, the share-weighted sum of stratum ends
 * (population shares, see {@link dev.bracket.bounds.StratifiedBounds}) is its mean over the
 * pooled population: one sequence per end on the pooled units accounts for the sampling of the
 * stratum shares with no extra term. Sets that bound a counterfactual mean by the other arm's
 * mean (monotone selection, sorting on gains) have ends with products such as {@code p mu0} and
 * get no quantities here. Pending outcomes are filled in at the end's extreme first
 * ({@link PerUnit#filled}).
 *
 * <p>Which bound is which is read off {@link AssumptionSet#constrain} at two points on either
 * side of the diagonal {@code mu1 = mu0}: every constraint is a max or min of the range ends and
 * the two means (see {@code Assumption}), so it is a single one of them on each side, and the two
 * points tell which.
 *
 * @param lower the quantity whose mean is the lower end
 * @param upper the quantity whose mean is the upper end
 */
record EndQuantities(PerUnit lower, PerUnit upper) {

    /** {@code g(y) = slope * y + offset}. */
    record Affine(double slope, double offset) {
        double at(double y) {
            return slope * y + offset;
        }

        double min(OutcomeRange range) {
            return Math.min(at(range.min()), at(range.max()));
        }

        double max(OutcomeRange range) {
            return Math.max(at(range.min()), at(range.max()));
        }
    }

    /** Count, mean and sum of squared deviations of a quantity over some units. */
    record Summary(long count, double mean, double m2) {
    }

    /** {@code T g1(Y) + (1 - T) g0(Y)}. */
    record PerUnit(Affine treated, Affine control) {

        /**
         * The cell with each pending outcome set to the range end where this quantity is smallest
         * ({@code highest} false) or largest: the extreme of its mean over everything the pending
         * outcomes could be, since the mean is linear in each unit's outcome (Horowitz &amp;
         * Manski 2000, JASA 95(449)). Without pending outcomes the cell itself.
         */
        ObservedArms filled(ObservedArms arms, OutcomeRange range, boolean highest) {
            return new ObservedArms(arms.treated().pendingAt(extremeOutcome(treated, range, highest)),
                    arms.control().pendingAt(extremeOutcome(control, range, highest)));
        }

        private static double extremeOutcome(Affine g, OutcomeRange range, boolean highest) {
            return (g.slope() >= 0) == highest ? range.max() : range.min();
        }

        /** The quantity's statistics over a cell's units with outcomes (Chan et al.'s merge of the two arms). */
        Summary over(ObservedArms arms, OutcomeRange range, VarianceBasis variance) {
            ArmStatistics t = arms.treated();
            ArmStatistics c = arms.control();
            long n = arms.total();
            if (n == 0) {
                return new Summary(0, 0, 0);
            }
            double m1 = t.isEmpty() ? 0 : treated.at(t.mean());
            double m0 = c.isEmpty() ? 0 : control.at(c.mean());
            double mean = (t.count() * m1 + c.count() * m0) / n;
            double m2 = treated.slope() * treated.slope() * variance.m2(t, range)
                    + control.slope() * control.slope() * variance.m2(c, range)
                    + t.count() * (m1 - mean) * (m1 - mean) + c.count() * (m0 - mean) * (m0 - mean);
            return new Summary(n, mean, m2);
        }

        /** Smallest value the quantity can take for outcomes in the range. */
        double min(OutcomeRange range) {
            return Math.min(treated.min(range), control.min(range));
        }

        /** Largest value the quantity can take for outcomes in the range. */
        double max(OutcomeRange range) {
            return Math.max(treated.max(range), control.max(range));
        }
    }

    private static final Affine ZERO = new Affine(0, 0);

    /**
     * An end written as {@code E[q] + treatedMean * mu1 + controlMean * mu0}: the mean of a
     * per-unit quantity over all units plus at most one arm mean each, with coefficients in
     * {@code {0, 1}} and {@code {0, -1}}. Besides the ends of {@link #of} (no arm means) this
     * covers the ends where a counterfactual mean is bounded by the other arm's mean, once the
     * products cancel: with {@code m01} bounded by mu0 and {@code m10} by a constant K the end is
     * {@code p (mu1 - mu0) + (1 - p)(K - mu0) = E[T Y + (1 - T) K] - mu0}; with {@code m01} bounded
     * by a constant K and {@code m10} by mu1 it is {@code mu1 - E[T K + (1 - T) Y]}; with both by
     * the other mean it is {@code mu1 - mu0}. Where one bound is the other mean and the other the
     * own mean ({@code p (mu1 - mu0)} or {@code (1 - p)(mu1 - mu0)}) no such form exists.
     *
     * @param quantity    q, possibly zero
     * @param treatedMean coefficient of mu1, 0 or 1
     * @param controlMean coefficient of mu0, 0 or -1
     */
    record Form(PerUnit quantity, int treatedMean, int controlMean) {

        /** Whether q is zero for every unit (so it needs no sequence). */
        boolean quantityIsZero() {
            return quantity.treated().equals(ZERO) && quantity.control().equals(ZERO);
        }

        /** The value at a point of the observables, for checks against {@link BoundCalculator}. */
        double at(double p, double mu1, double mu0) {
            return p * quantity.treated().at(mu1) + (1 - p) * quantity.control().at(mu0) + treatedMean * mu1 + controlMean * mu0;
        }
    }

    /** How a bound on a counterfactual mean reads at both probe points. */
    private enum Kind { OWN, OTHER, CONSTANT, MIXED }

    /**
     * The {@link Form} of the lower (or upper) end, or empty when it has none or the set is
     * refutable (see {@link #end}).
     */
    static Optional<Form> form(OutcomeRange range, AssumptionSet assumptions, boolean upper) {
        double low = range.min() + range.width() / 4;
        double high = range.min() + 3 * range.width() / 4;
        UnobservedMeans above = assumptions.constrain(range, high, low); // mu1 > mu0
        UnobservedMeans below = assumptions.constrain(range, low, high); // mu1 < mu0
        if (above.m10Low() > above.m10High() || above.m01Low() > above.m01High()
                || below.m10Low() > below.m10High() || below.m01Low() > below.m01High()) {
            return Optional.empty(); // refutable: the ends are not smooth in the means
        }
        double xAbove = upper ? above.m01Low() : above.m01High();
        double xBelow = upper ? below.m01Low() : below.m01High();
        double yAbove = upper ? above.m10High() : above.m10Low();
        double yBelow = upper ? below.m10High() : below.m10Low();
        Kind x = kind(xAbove, xBelow, high, low, range); // m01: own mean mu1 (high above), other mu0
        Kind y = kind(yAbove, yBelow, low, high, range); // m10: own mean mu0 (low above), other mu1
        if (x == Kind.MIXED || y == Kind.MIXED || (x == Kind.OTHER) != (y == Kind.OTHER) && (x == Kind.OWN || y == Kind.OWN)) {
            return Optional.empty();
        }
        if (x == Kind.OTHER && y == Kind.OTHER) {
            return Optional.of(new Form(new PerUnit(ZERO, ZERO), 1, -1));
        }
        if (x == Kind.OTHER) {
            return Optional.of(new Form(new PerUnit(new Affine(1, 0), new Affine(0, yAbove)), 0, -1));
        }
        if (y == Kind.OTHER) {
            return Optional.of(new Form(new PerUnit(new Affine(0, -xAbove), new Affine(-1, 0)), 1, 0));
        }
        // No other arm's mean: the treated term p (mu1 - m01) is E[T (Y - K)] for a constant bound K and 0
        // for the own mean mu1; the control term (1 - p)(m10 - mu0) is E[(1 - T)(K - Y)], or 0.
        Affine treated = x == Kind.CONSTANT ? new Affine(1, -xAbove) : ZERO;
        Affine control = y == Kind.CONSTANT ? new Affine(-1, yAbove) : ZERO;
        return Optional.of(new Form(new PerUnit(treated, control), 0, 0));
    }

    private static Kind kind(double atAbove, double atBelow, double ownAbove, double ownBelow, OutcomeRange range) {
        if (atAbove == ownAbove && atBelow == ownBelow) {
            return Kind.OWN;
        }
        if (atAbove == ownBelow && atBelow == ownAbove) {
            return Kind.OTHER;
        }
        if (atAbove == atBelow && (atAbove == range.min() || atAbove == range.max())) {
            return Kind.CONSTANT;
        }
        return Kind.MIXED;
    }

    /** The quantities for this set, or empty when an end is not the mean of a per-unit quantity. */
    static Optional<EndQuantities> of(OutcomeRange range, AssumptionSet assumptions) {
        Optional<PerUnit> lower = end(range, assumptions, false);
        Optional<PerUnit> upper = end(range, assumptions, true);
        return lower.isPresent() && upper.isPresent() ? Optional.of(new EndQuantities(lower.get(), upper.get())) : Optional.empty();
    }

    /**
     * The quantity whose mean is the lower (or upper) end, or empty when that end is not such a
     * mean, and always empty for sets the data can refute (their band must be able to say so,
     * which takes a box of the observables).
     */
    static Optional<PerUnit> end(OutcomeRange range, AssumptionSet assumptions, boolean upper) {
        return form(range, assumptions, upper).filter(f -> f.treatedMean() == 0 && f.controlMean() == 0).map(Form::quantity);
    }
}
