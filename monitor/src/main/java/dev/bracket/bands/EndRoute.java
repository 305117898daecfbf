package dev.bracket.bands;

import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.bounds.UnobservedMeans;

import java.util.Optional;

/**
 * How the anytime band bounds one end of the identified interval when each end gets its own
 * share of the error: as the mean of a per-unit quantity plus at most one arm mean each
 * ({@link EndQuantities.Form}), or over a box
 * of the observables that reaches out on one side only, which needs no sequence for the treated
 * share when the end does not depend on it.
 *
 * <p>By {@link dev.bracket.bounds.BoundCalculator} an end is {@code p (mu1 - X) + (1 - p)(Y - mu0)},
 * where X is the bound on {@code E[Y0 | T = 1]} and Y the one on {@code E[Y1 | T = 0]} that
 * makes the end extreme; its derivative in p is {@code mu1 + mu0 - X - Y}. Every constraint of
 * {@link dev.bracket.bounds.Assumption} bounds X and Y by a range end or an observed mean (and
 * a mean always beats a range end, as it lies within the range), so on each side of the diagonal
 * {@code mu1 = mu0} X and Y are each a single one of {@code a, b, mu1, mu0}. At the probe
 * {@code (mu1, mu0) = (a + 0.2 w, a + 0.7 w)} (and its mirror) the sum {@code X + Y} equals
 * {@code mu1 + mu0} only when {X, Y} is {mu1, mu0} (every other pair sums to one of 0, w, 2w,
 * 0.2w, 0.7w, 1.2w, 1.7w, 0.4w or 1.4w above 2a), so one probe per side tells whether the end
 * moves with p: it does not for monotone treatment selection's upper end {@code mu1 - mu0}.
 *
 * <p>Ends of either kind are nondecreasing in mu1 and nonincreasing in mu0 (X and Y move with a
 * mean at slope 0 or 1, so the slopes {@code p (1 - dX/dmu1) + (1 - p) dY/dmu1} and
 * {@code -p dX/dmu0 - (1 - p)(1 - dY/dmu0)} have fixed signs); a one-sided bound on each arm's
 * mean, in the direction that moves the end outward, is therefore all a box needs.
 *
 * @param form           the end as a per-unit mean plus arm means, when it has that form and the data allow it
 * @param movesWithShare whether the end depends on the treated share p
 */
record EndRoute(Optional<EndQuantities.Form> form, boolean movesWithShare) {

    /**
     * The route of the lower (or upper) end. {@code quantitiesKnown} is false when pending
     * outcomes have no per-unit value to stand in (missing at random), which rules out a nonzero
     * quantity; with several strata an arm mean term would need each stratum's arm means, so only
     * forms without them apply.
     */
    static EndRoute of(OutcomeRange range, AssumptionSet assumptions, boolean upper, boolean quantitiesKnown, boolean oneStratum) {
        Optional<EndQuantities.Form> form = EndQuantities.form(range, assumptions, upper)
                .filter(f -> quantitiesKnown || f.quantityIsZero())
                .filter(f -> oneStratum || f.treatedMean() == 0 && f.controlMean() == 0);
        double near = range.min() + 0.2 * range.width();
        double far = range.min() + 0.7 * range.width();
        boolean moves = movesAt(range, assumptions, upper, near, far) || movesAt(range, assumptions, upper, far, near);
        return new EndRoute(form, moves);
    }

    /** Whether this route beats today's box, which spends error on p, mu1 and mu0 for both ends together. */
    boolean separate() {
        return form.isPresent() || !movesWithShare;
    }

    private static boolean movesAt(OutcomeRange range, AssumptionSet assumptions, boolean upper, double mu1, double mu0) {
        UnobservedMeans box = assumptions.constrain(range, mu1, mu0);
        if (box.isEmpty(0)) {
            return false; // the assumptions rule this side out: the end has no value there
        }
        double x = upper ? box.m01Low() : box.m01High();
        double y = upper ? box.m10High() : box.m10Low();
        return x + y != mu1 + mu0;
    }
}
