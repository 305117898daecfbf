package dev.bracket.bands;

import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.BoundCalculator;
import dev.bracket.bounds.IdentifiedInterval;
import dev.bracket.bounds.IndependentInstrumentBounds;
import dev.bracket.bounds.InstrumentAssumption;
import dev.bracket.bounds.InstrumentBounds;
import dev.bracket.bounds.ObservablesBox;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.bounds.StudyCells;

import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.function.Function;

/**
 * Turns boxes of plausible observable quantities, one per cell, into a band for the study's ATE
 * interval. If every cell's true (p, mu1, mu0) lies in its box, the true identified set lies in
 * the returned band, and "refuted" is returned only if no point of some box is compatible with
 * the assumptions; so a band built from boxes with simultaneous coverage 1 - alpha has coverage
 * (of the whole identified set) and a false-refutation rate controlled at the same level.
 *
 * <p>Within a cell the ends are bilinear in p and the means, piecewise along {@code mu1 = mu0};
 * their extremes over the box are attained at p in {pLow, pHigh} and the mean vertices of
 * {@link ObservablesBox#meanVertices()}. Vertices where the assumptions are refuted are skipped,
 * which is why the diagonal points are needed besides the corners: at a refuted corner the
 * extreme moves to where the box meets the diagonal.
 *
 * <p>Instrument levels (Manski 1990 mean independence, see {@link InstrumentBounds}): with
 * per-level ranges of the bounds on E[Y1] and E[Y0], the band is
 * {@code [max_z min L1_z - min_z max U0_z, min_z max U1_z - max_z min L0_z]}, and the data refute
 * the assumptions when {@code max_z min L1_z > min_z max U1_z} (or the same for Y0): valid because
 * the true L1_z is at least min L1_z for every z and the true U1_w at most max U1_w.
 *
 * <p>Independent instrument (binary outcome, see {@link IndependentInstrumentBounds}): the linear
 * programs over response types are solved once with every level's box as interval constraints,
 * which gives the lowest lower and highest upper sharp bound over all points of the boxes at
 * once (and refuted when no point is compatible); beyond
 * {@link IndependentInstrumentBounds#MAX_LEVELS} levels the mean-independence projection above.
 *
 * <p>Strata: the study's ends are the stratum ends weighted by the population stratum shares,
 * which the sample only estimates. Each stratum's share gets its own confidence interval
 * ({@link ShareInterval}, part of the same error budget), and the band takes the lowest (highest)
 * weighted sum of the stratum bands' lower (upper) ends over all share vectors in those intervals
 * that sum to one: start every share at its low end and hand the rest to the strata with the
 * smallest (largest) ends first. If every share and every box holds its truth, the population
 * interval lies in the band.
 */
final class BoxProjection {

    private BoxProjection() {
    }

    /** Lower and upper end of a band. */
    record Ends(double lower, double upper) {
    }

    /** A confidence interval {low, high} for a stratum's population share, from its units and all units. */
    interface ShareInterval {
        double[] of(long stratumUnits, long allUnits);
    }

    /** Number of cells (stratum × instrument level) with units: the Bonferroni divisor, three sequences each. */
    static int cellCount(StudyCells cells) {
        int k = 0;
        for (Map<String, ObservedArms> levels : cells.byStratum().values()) {
            for (ObservedArms arms : levels.values()) {
                if (arms.total() > 0) {
                    k++;
                }
            }
        }
        return k;
    }

    /** Strata with units whose shares need intervals: none when a single stratum has all units. */
    static int shareCount(StudyCells cells) {
        int strata = 0;
        for (String s : cells.byStratum().keySet()) {
            if (cells.pooled(s).total() > 0) {
                strata++;
            }
        }
        return strata > 1 ? strata : 0;
    }

    /** The band of a study from one box per cell and an interval per stratum share; empty when the boxes refute the assumptions. */
    static Optional<Ends> study(StudyCells cells, OutcomeRange range, AssumptionSet assumptions,
                                Function<ObservedArms, ObservablesBox> boxOf, ShareInterval shares) {
        long total = cells.pooled().total();
        boolean oneStratum = shareCount(cells) == 0;
        List<double[]> strata = new ArrayList<>(); // {share low, share high, lower end, upper end}
        for (Map.Entry<String, Map<String, ObservedArms>> e : cells.byStratum().entrySet()) {
            Map<String, ObservedArms> levels = e.getValue();
            long stratumTotal = cells.pooled(e.getKey()).total();
            if (stratumTotal == 0) {
                continue; // weight zero, as in StratifiedBounds
            }
            Optional<Ends> stratum = levels.size() == 1
                    ? cell(boxOf.apply(levels.values().iterator().next()), range, assumptions)
                    : instrument(levels, range, assumptions, boxOf);
            if (stratum.isEmpty()) {
                return Optional.empty();
            }
            double[] share = oneStratum ? new double[] {1, 1} : shares.of(stratumTotal, total);
            strata.add(new double[] {Math.max(0, share[0]), Math.min(1, share[1]), stratum.get().lower(), stratum.get().upper()});
        }
        return Optional.of(new Ends(weighted(strata, 2, true), weighted(strata, 3, false)));
    }

    /**
     * The smallest (or largest) {@code sum w_s e_s} over {@code low_s <= w_s <= high_s},
     * {@code sum w_s = 1}, with e in column {@code end}: a linear program over a box cut by one
     * equation, solved greedily (the shares left over go to the most extreme ends first).
     */
    private static double weighted(List<double[]> strata, int end, boolean lowest) {
        List<double[]> order = new ArrayList<>(strata);
        order.sort(Comparator.comparingDouble(s -> lowest ? s[end] : -s[end]));
        double left = 1;
        double sum = 0;
        for (double[] s : order) {
            left -= s[0];
            sum += s[0] * s[end];
        }
        for (double[] s : order) {
            double more = Math.max(0, Math.min(s[1] - s[0], left));
            sum += more * s[end];
            left -= more;
        }
        return sum;
    }

    /**
     * Lowest lower end and highest upper end over one cell's box; empty when every point is refuted.
     *
     * <p>Both ends are non-decreasing in mu1 and non-increasing in mu0 (see
     * {@link BoundCalculator#interval(double, double, double, OutcomeRange, AssumptionSet)}; each
     * constraint is a max or min of a, b and the means, and the floating-point operations used,
     * min, max, subtraction, multiplication by p or 1 - p in [0, 1] and addition, are each monotone
     * too, so the computed ends are). Hence when the assumptions hold at the corner
     * (mu1Low, mu0High), it holds the lowest lower end of every vertex, and (mu1High, mu0Low) the
     * highest upper end: two corners at two values of p give exactly what all vertices give
     * ({@link #cellByVertices}). Only when such a corner is refuted are all vertices needed.
     */
    static Optional<Ends> cell(ObservablesBox box, OutcomeRange range, AssumptionSet assumptions) {
        IdentifiedInterval lowAtPLow = BoundCalculator.interval(box.pLow(), box.mu1Low(), box.mu0High(), range, assumptions);
        IdentifiedInterval highAtPLow = BoundCalculator.interval(box.pLow(), box.mu1High(), box.mu0Low(), range, assumptions);
        if (!lowAtPLow.isBounded() || !highAtPLow.isBounded()) { // refutation does not depend on p
            return cellByVertices(box, range, assumptions);
        }
        IdentifiedInterval lowAtPHigh = BoundCalculator.interval(box.pHigh(), box.mu1Low(), box.mu0High(), range, assumptions);
        IdentifiedInterval highAtPHigh = BoundCalculator.interval(box.pHigh(), box.mu1High(), box.mu0Low(), range, assumptions);
        return Optional.of(new Ends(Math.min(lowAtPLow.lower(), lowAtPHigh.lower()), Math.max(highAtPLow.upper(), highAtPHigh.upper())));
    }

    /** The same as {@link #cell}, by evaluating the bounds at every vertex of the box, skipping refuted ones. */
    static Optional<Ends> cellByVertices(ObservablesBox box, OutcomeRange range, AssumptionSet assumptions) {
        double lower = Double.POSITIVE_INFINITY;
        double upper = Double.NEGATIVE_INFINITY;
        for (double[] m : box.meanVertices()) {
            for (double p : new double[] {box.pLow(), box.pHigh()}) {
                IdentifiedInterval iv = BoundCalculator.interval(p, m[0], m[1], range, assumptions);
                if (iv.isBounded()) {
                    lower = Math.min(lower, iv.lower());
                    upper = Math.max(upper, iv.upper());
                }
            }
        }
        return lower <= upper ? Optional.of(new Ends(lower, upper)) : Optional.empty();
    }

    private static Optional<Ends> instrument(Map<String, ObservedArms> levels, OutcomeRange range, AssumptionSet assumptions,
                                             Function<ObservedArms, ObservablesBox> boxOf) {
        if (assumptions.instrument() == InstrumentAssumption.INDEPENDENT) {
            List<ObservablesBox> boxes = new ArrayList<>();
            levels.values().stream().filter(arms -> arms.total() > 0).forEach(arms -> boxes.add(boxOf.apply(arms)));
            if (boxes.size() <= IndependentInstrumentBounds.MAX_LEVELS) {
                IdentifiedInterval band = IndependentInstrumentBounds.overBoxes(boxes, range, assumptions);
                return band.isBounded() ? Optional.of(new Ends(band.lower(), band.upper())) : Optional.empty();
            }
        }
        double l1 = Double.NEGATIVE_INFINITY;
        double u1 = Double.POSITIVE_INFINITY;
        double l0 = Double.NEGATIVE_INFINITY;
        double u0 = Double.POSITIVE_INFINITY;
        for (ObservedArms arms : levels.values()) {
            if (arms.total() == 0) {
                continue;
            }
            Optional<InstrumentBounds.LevelMeans> level = levelRanges(boxOf.apply(arms), range, assumptions);
            if (level.isEmpty()) {
                return Optional.empty();
            }
            l1 = Math.max(l1, level.get().y1Low());
            u1 = Math.min(u1, level.get().y1High());
            l0 = Math.max(l0, level.get().y0Low());
            u0 = Math.min(u0, level.get().y0High());
        }
        if (l1 > u1 || l0 > u0) {
            return Optional.empty();
        }
        return Optional.of(new Ends(l1 - u0, u1 - l0));
    }

    /**
     * Over one level's box: the smallest lower and largest upper bound on E[Y1 | z] and on
     * E[Y0 | z], packed as a {@link InstrumentBounds.LevelMeans}; empty when every point is refuted.
     *
     * <p>All four bounds are non-decreasing in both means (each is {@code p mu1} or
     * {@code (1 - p) mu0} plus the other share times a max or min of a, b and the means; the
     * floating-point operations are monotone as well), so when the assumptions hold at
     * (mu1Low, mu0Low) and (mu1High, mu0High) those two corners at two values of p give exactly
     * what all vertices give ({@link #levelRangesByVertices}).
     */
    static Optional<InstrumentBounds.LevelMeans> levelRanges(ObservablesBox box, OutcomeRange range, AssumptionSet assumptions) {
        Optional<InstrumentBounds.LevelMeans> lowAtPLow = InstrumentBounds.levelMeans(box.pLow(), box.mu1Low(), box.mu0Low(), range, assumptions);
        Optional<InstrumentBounds.LevelMeans> highAtPLow = InstrumentBounds.levelMeans(box.pLow(), box.mu1High(), box.mu0High(), range, assumptions);
        if (lowAtPLow.isEmpty() || highAtPLow.isEmpty()) { // refutation does not depend on p
            return levelRangesByVertices(box, range, assumptions);
        }
        InstrumentBounds.LevelMeans low = lowAtPLow.get();
        InstrumentBounds.LevelMeans lowHigh = InstrumentBounds.levelMeans(box.pHigh(), box.mu1Low(), box.mu0Low(), range, assumptions).get();
        InstrumentBounds.LevelMeans high = highAtPLow.get();
        InstrumentBounds.LevelMeans highHigh = InstrumentBounds.levelMeans(box.pHigh(), box.mu1High(), box.mu0High(), range, assumptions).get();
        return Optional.of(new InstrumentBounds.LevelMeans(Math.min(low.y1Low(), lowHigh.y1Low()), Math.max(high.y1High(), highHigh.y1High()),
                Math.min(low.y0Low(), lowHigh.y0Low()), Math.max(high.y0High(), highHigh.y0High())));
    }

    /** The same as {@link #levelRanges}, by evaluating the bounds at every vertex of the box, skipping refuted ones. */
    static Optional<InstrumentBounds.LevelMeans> levelRangesByVertices(ObservablesBox box, OutcomeRange range, AssumptionSet assumptions) {
        double y1Low = Double.POSITIVE_INFINITY;
        double y1High = Double.NEGATIVE_INFINITY;
        double y0Low = Double.POSITIVE_INFINITY;
        double y0High = Double.NEGATIVE_INFINITY;
        boolean any = false;
        for (double[] m : box.meanVertices()) {
            for (double p : new double[] {box.pLow(), box.pHigh()}) {
                Optional<InstrumentBounds.LevelMeans> at = InstrumentBounds.levelMeans(p, m[0], m[1], range, assumptions);
                if (at.isPresent()) {
                    any = true;
                    y1Low = Math.min(y1Low, at.get().y1Low());
                    y1High = Math.max(y1High, at.get().y1High());
                    y0Low = Math.min(y0Low, at.get().y0Low());
                    y0High = Math.max(y0High, at.get().y0High());
                }
            }
        }
        return any ? Optional.of(new InstrumentBounds.LevelMeans(y1Low, y1High, y0Low, y0High)) : Optional.empty();
    }
}
