package dev.bracket.bands;

import dev.bracket.bounds.ArmMeanRange;
import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.Assumption;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.BoundStatus;
import dev.bracket.bounds.IdentifiedInterval;
import dev.bracket.bounds.ObservablesBox;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.bounds.StratifiedBounds;
import dev.bracket.bounds.StudyCells;

import java.util.IdentityHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Optional;
import java.util.OptionalDouble;
import java.util.concurrent.ConcurrentHashMap;

/**
 * The anytime-valid band: with probability at least {@code level}, at every look at once, the
 * band holds the whole identified set of the population. Looking after every event, stopping when
 * a result looks interesting, or continuing when it does not, all keep this guarantee; it is the
 * band alerts use.
 *
 * <p>Every sequence is an {@link EmpiricalBernsteinBoundary} (Howard, Ramdas, McAuliffe &amp;
 * Sekhon 2021, Ann. Statist. 49(2), Thm 4, with Fan et al.'s 2015 inequality): finite-sample
 * valid for any law in the declared range, and as narrow as the data's spread allows. Three
 * constructions:
 * <ol>
 *   <li>One sequence per end. When each end is the mean of a per-unit quantity
 *       ({@link EndQuantities}: worst case, monotone response, optimizing selection and their
 *       combinations, without instrument levels), a lower bound for the lower end's quantity and
 *       an upper bound for the upper end's, each at error {@code alpha / 2}, on all units pooled.
 *       Pooling is exact for strata: the quantity is the same in every stratum, so its pooled
 *       mean is the population-share-weighted sum of the stratum ends.</li>
 *   <li>Otherwise, without instrument levels, each end on its own at error {@code alpha / 2}
 *       ({@link EndRoute}), when at least one end gains by it: an end of the form
 *       {@code E[q] + c1 mu1 + c0 mu0} ({@link EndQuantities.Form}; one stratum) gets a one-sided
 *       bound on each present piece, its error split evenly over them (monotone selection's
 *       {@code mu1 - mu0}: one bound per arm mean at {@code alpha / 4}); any other end is
 *       extremised over boxes that reach from one-sided bounds on the arm means to the range
 *       ends, with a two-sided interval for the treated share only if the end moves with it, and
 *       for the stratum shares (Bonferroni over these bounds' tails). "Refuted" when some end's
 *       boxes leave no point the assumptions allow.</li>
 *   <li>Otherwise a box per cell (stratum × instrument level): two-sided sequences for the
 *       treated share and each arm's mean, and one per stratum share when there are several
 *       strata, each at error {@code alpha / (3 K + S)} for K cells and S shares (Bonferroni);
 *       {@link BoxProjection} turns the boxes into the band, and says "refuted" when no point
 *       of some box is compatible with the assumptions.</li>
 * </ol>
 * In every case, if every sequence holds its truth, the band holds the identified set, so the
 * chance that it ever misses is at most {@code 1 - level}.
 *
 * <p>Inputs are each arm's count, mean and sum of squared deviations (M2): statistics that merge
 * across partitions, with no observation history and no dependence on the order of arrival. With
 * {@link VarianceBasis#RANGE_BOUND} (no standard deviation known) M2 is replaced by its largest
 * value for outcomes in the declared range. The boundary's tuning is fixed by
 * {@code plannedCount}, chosen before the data are seen.
 *
 * <p>Pending outcomes (exposed units whose outcome has not arrived): the identified set is the
 * union over each arm's {@link dev.bracket.bounds.ArmMeanRange} (Horowitz &amp; Manski 2000, JASA
 * 95(449)). In route 1 an end is linear in every unit's outcome, so its extreme over the pending
 * outcomes puts each pending unit at the range end where that end's quantity is smallest (lower
 * end) or largest (upper end); that unit's quantity is then a known bounded number and the
 * sequence runs over all units ({@link EndQuantities.PerUnit#filled}); route 2's per-unit pieces
 * likewise. In routes 2 and 3 each arm's mean bound or box runs from the low end of its arm-mean
 * range (pending units at a) to the high end (at b), each a mean of bounded per-unit quantities.
 * Under {@code missing-at-random} a pending unit's quantity is not known at all, so pending
 * outcomes then rule out per-unit quantities (route 2 keeps ends made of arm means alone), and
 * the arm means come from the observed outcomes alone and the treated share from all units.
 *
 * <p>Thread-safe; its results depend on its settings only (it keeps what it built for earlier bands:
 * boundaries, descriptions, each end's construction per assumption set, and the last study's cell
 * boxes and stratum-share intervals, the boxes also keyed on whether the assumptions include
 * {@code missing-at-random}, which changes the boxes of pending outcomes);
 * build one per configured level and reuse it.
 */
public final class AnytimeBand {

    /** Default tuning: weights peak around ten thousand observations per sequence (a choice, no source). */
    public static final long DEFAULT_PLANNED_COUNT = 10_000;

    private final double level;
    private final long plannedCount;
    private final VarianceBasis variance;
    private final EmpiricalBernsteinBoundary perEnd;
    private final EmpiricalBernsteinBoundary singleCellBox;
    private final String perEndBasis;
    private final String singleCellBoxBasis;
    /** Box boundaries and descriptions by number of sequences (times two, plus one with stratum shares): built once, not per band. */
    private final Map<Integer, EmpiricalBernsteinBoundary> boxBoundaries = new ConcurrentHashMap<>();
    private final Map<Integer, String> boxBases = new ConcurrentHashMap<>();
    /** Route 2's boundaries by number of one-sided bounds per end, and its descriptions by shape. */
    private final Map<Integer, EmpiricalBernsteinBoundary> tailBoundaries = new ConcurrentHashMap<>();
    private final Map<List<Object>, String> separateBases = new ConcurrentHashMap<>();
    /** Each end's construction by settings (range, assumptions, pending quantities known, one stratum). */
    private final Map<RouteKey, Routes> routes = new ConcurrentHashMap<>();
    private static final int MAX_ROUTES = 256;
    private volatile CellBoxes lastBoxes;

    /** Bands by settings: building one costs more than a band, and the settings rarely change. */
    private static final Map<List<Object>, AnytimeBand> SHARED = new ConcurrentHashMap<>();
    private static final int MAX_SHARED = 16;
    private static volatile AnytimeBand lastShared;

    /**
     * @param level        confidence level 1 - alpha, in (0, 1)
     * @param plannedCount number of observations per sequence at which the boundary is tightest
     * @param variance     where each arm's spread comes from
     */
    public AnytimeBand(double level, long plannedCount, VarianceBasis variance) {
        if (!(level > 0 && level < 1)) {
            throw new IllegalArgumentException("level must lie strictly between 0 and 1, was " + level);
        }
        if (plannedCount < 1) {
            throw new IllegalArgumentException("planned count must be >= 1, was " + plannedCount);
        }
        if (variance == null) {
            throw new IllegalArgumentException("variance basis is required");
        }
        this.level = level;
        this.plannedCount = plannedCount;
        this.variance = variance;
        this.perEnd = new EmpiricalBernsteinBoundary((1 - level) / 2, plannedCount);
        this.singleCellBox = boxBoundary(3);
        this.perEndBasis = basis(true, false, 2);
        this.singleCellBoxBasis = basis(false, false, 3);
    }

    /** The band for these settings, built once and then reused (see the constructor). */
    public static AnytimeBand shared(double level, long plannedCount, VarianceBasis variance) {
        AnytimeBand last = lastShared;
        if (last != null && last.level == level && last.plannedCount == plannedCount && last.variance == variance) {
            return last; // the usual case: one setting for every row of every report
        }
        List<Object> key = List.of(level, plannedCount, variance);
        AnytimeBand band = SHARED.get(key);
        if (band == null) {
            if (SHARED.size() >= MAX_SHARED) {
                SHARED.clear();
            }
            band = SHARED.computeIfAbsent(key, k -> new AnytimeBand(level, plannedCount, variance));
        }
        lastShared = band;
        return band;
    }

    /** The band from observed spreads, tuned for {@link #DEFAULT_PLANNED_COUNT}. */
    public AnytimeBand(double level) {
        this(level, DEFAULT_PLANNED_COUNT, VarianceBasis.SAMPLE);
    }

    public double level() {
        return level;
    }

    public long plannedCount() {
        return plannedCount;
    }

    /** The band of a whole study. */
    public ConfidenceBand of(StudyCells cells, OutcomeRange range, AssumptionSet assumptions) {
        return of(cells, range, assumptions, StratifiedBounds.interval(cells, range, assumptions).overall());
    }

    /** The same, given the study's estimated interval (to spare computing it again). */
    public ConfidenceBand of(StudyCells cells, OutcomeRange range, AssumptionSet assumptions, IdentifiedInterval estimate) {
        boolean levels = cells.byStratum().values().stream().anyMatch(l -> l.size() > 1);
        boolean known = !unknownPendingQuantities(cells, assumptions);
        int shares = BoxProjection.shareCount(cells);
        Routes routes = levels ? null : routes(range, assumptions, known, shares == 0);
        Optional<EndQuantities> ends = levels ? Optional.empty() : routes.ends();
        boolean separate = routes != null && routes.separate();
        EndRoute lowerRoute = separate ? routes.lower() : null;
        EndRoute upperRoute = separate ? routes.upper() : null;
        int sequences = ends.isPresent() ? 2 : 3 * Math.max(1, BoxProjection.cellCount(cells)) + shares;
        String basis = ends.isPresent() ? perEndBasis
                : separate ? separateBasis(cells, lowerRoute, upperRoute)
                : sequences == 3 ? singleCellBoxBasis
                : boxBases.computeIfAbsent(2 * sequences + (shares > 0 ? 1 : 0), k -> basis(false, shares > 0, sequences));
        // A stratum seen in one arm only has no box for its missing arm: no band until both arms are seen.
        if (estimate.status() == BoundStatus.INSUFFICIENT_DATA || !StratifiedBounds.oneArmed(cells).isEmpty()) {
            return ConfidenceBand.insufficientData(BandMethod.ANYTIME, level, basis);
        }
        if (ends.isPresent()) {
            return perEnd(cells, range, ends.get(), basis);
        }
        if (separate) {
            return separately(cells, range, assumptions, lowerRoute, upperRoute, basis);
        }
        EmpiricalBernsteinBoundary boundary = sequences == 3 ? singleCellBox : boxBoundaries.computeIfAbsent(sequences, this::boxBoundary);
        CellBoxes boxes = lastBoxes;
        boolean missingAtRandom = assumptions.contains(Assumption.MISSING_AT_RANDOM);
        if (boxes == null || boxes.cells() != cells || !boxes.range().equals(range) || boxes.boundary() != boundary
                || boxes.missingAtRandom() != missingAtRandom) {
            boxes = new CellBoxes(cells, range, boundary, missingAtRandom, boxesOf(cells, range, assumptions, boundary),
                    new ConcurrentHashMap<>());
            lastBoxes = boxes;
        }
        Map<Long, double[]> shareIntervals = boxes.shares();
        return band(BoxProjection.study(cells, range, assumptions, boxes.byCell()::get,
                (units, all) -> shareIntervals.computeIfAbsent(units, u -> share(u, all, boundary))), basis);
    }

    /** The band of a single cell; the same as {@link #of} for {@code StudyCells.single(arms)}, without the bookkeeping. */
    public ConfidenceBand ofCell(ObservedArms arms, OutcomeRange range, AssumptionSet assumptions) {
        boolean known = !unknownPendingQuantities(StudyCells.single(arms), assumptions);
        Routes routes = routes(range, assumptions, known, true);
        Optional<EndQuantities> ends = routes.ends();
        if (routes.separate()) {
            StudyCells cell = StudyCells.single(arms);
            String basis = separateBasis(cell, routes.lower(), routes.upper());
            return arms.hasEmptyArm() ? ConfidenceBand.insufficientData(BandMethod.ANYTIME, level, basis)
                    : separately(cell, range, assumptions, routes.lower(), routes.upper(), basis);
        }
        String basis = ends.isPresent() ? perEndBasis : singleCellBoxBasis;
        if (arms.hasEmptyArm()) {
            return ConfidenceBand.insufficientData(BandMethod.ANYTIME, level, basis);
        }
        if (ends.isPresent()) {
            return perEnd(StudyCells.single(arms), range, ends.get(), basis);
        }
        return band(BoxProjection.cell(box(arms, range, assumptions, singleCellBox, true), range, assumptions), basis);
    }

    /** Missing-at-random with pending outcomes: a pending unit's per-unit quantity is unknown (no per-unit quantities). */
    private static boolean unknownPendingQuantities(StudyCells cells, AssumptionSet assumptions) {
        return assumptions.contains(Assumption.MISSING_AT_RANDOM) && cells.hasPending();
    }

    /**
     * Lower bound of the lower end's quantity, upper bound of the upper end's, on the pooled units,
     * each cell's pending units filled in at that end's extreme before pooling.
     */
    private ConfidenceBand perEnd(StudyCells cells, OutcomeRange range, EndQuantities ends, String basis) {
        double lower = quantityEnd(cells, range, ends.lower(), false, perEnd);
        double upper = quantityEnd(cells, range, ends.upper(), true, perEnd);
        return ConfidenceBand.of(BandMethod.ANYTIME, level, lower, Math.max(lower, upper), basis);
    }

    /** A one-sided bound on the mean of a per-unit quantity over the pooled units (route 1: at {@code alpha / 2}). */
    private double quantityEnd(StudyCells cells, OutcomeRange range, EndQuantities.PerUnit quantity, boolean upper,
                               EmpiricalBernsteinBoundary boundary) {
        EndQuantities.Summary s = quantity.over(filled(cells, quantity, range, upper), range, variance);
        double min = quantity.min(range);
        double max = quantity.max(range);
        return upper ? s.mean() + boundary.radius(s.count(), s.m2(), max - min, max - s.mean())
                : s.mean() - boundary.radius(s.count(), s.m2(), max - min, s.mean() - min);
    }

    /**
     * An end of {@link EndQuantities.Form} {@code E[q] + c1 mu1 + c0 mu0} (one stratum): a
     * one-sided bound on each present piece in the direction that moves the end outward, the
     * error {@code alpha / 2} split evenly over the pieces. With pending outcomes q is filled in
     * at its extreme and each arm mean bound starts from its {@link ArmMeanRange} end; taking
     * each piece's extreme separately can only widen the band.
     */
    private double formEnd(StudyCells cells, OutcomeRange range, AssumptionSet assumptions, EndQuantities.Form form, boolean upper) {
        int pieces = (form.quantityIsZero() ? 0 : 1) + form.treatedMean() - form.controlMean();
        EmpiricalBernsteinBoundary boundary = pieces <= 1 ? perEnd : tailBoundary(pieces);
        double value = form.quantityIsZero() ? 0 : quantityEnd(cells, range, form.quantity(), upper, boundary);
        ObservedArms arms = cells.pooled();
        if (form.treatedMean() != 0) {
            value += meanBound(arms.treated(), range, assumptions, boundary, upper);
        }
        if (form.controlMean() != 0) {
            value -= meanBound(arms.control(), range, assumptions, boundary, !upper);
        }
        return value;
    }

    /** A one-sided bound on an arm's mean over all its units: above the high end of its mean range, or below the low end. */
    private double meanBound(ArmStatistics arm, OutcomeRange range, AssumptionSet assumptions, EmpiricalBernsteinBoundary boundary,
                             boolean high) {
        ArmMeanRange means = ArmMeanRange.of(arm, range, assumptions);
        ArmStatistics end = high ? means.high() : means.low();
        double radius = boundary.radius(end.count(), variance.m2(end, range), range.width(),
                high ? range.max() - end.mean() : end.mean() - range.min());
        return high ? end.mean() + radius : end.mean() - radius;
    }

    private EmpiricalBernsteinBoundary tailBoundary(int tails) {
        return tailBoundaries.computeIfAbsent(tails, t -> new EmpiricalBernsteinBoundary((1 - level) / 2 / t, plannedCount));
    }

    /**
     * Route 2: each end on its own at error {@code alpha / 2}, from its per-unit quantity or from
     * one-sided boxes ({@link EndRoute}); "refuted" when either end's boxes leave no point the
     * assumptions allow.
     */
    private ConfidenceBand separately(StudyCells cells, OutcomeRange range, AssumptionSet assumptions,
                                      EndRoute lowerRoute, EndRoute upperRoute, String basis) {
        OptionalDouble lower = end(cells, range, assumptions, lowerRoute, false);
        OptionalDouble upper = end(cells, range, assumptions, upperRoute, true);
        if (lower.isEmpty() || upper.isEmpty()) {
            return ConfidenceBand.refuted(BandMethod.ANYTIME, level, basis);
        }
        return ConfidenceBand.of(BandMethod.ANYTIME, level, lower.getAsDouble(),
                Math.max(lower.getAsDouble(), upper.getAsDouble()), basis);
    }

    /**
     * One end of route 2: by {@link #formEnd} when it has a {@link EndQuantities.Form}; otherwise
     * every cell's box reaches from the arm means' one-sided bounds (lower end: mu1 at least its
     * bound, mu0 at most its bound; the upper end the other way) to the range ends, with a
     * two-sided interval for p only if the end moves with it, plus the stratum shares; the error
     * {@code alpha / 2} is split evenly over these bounds' tails (Bonferroni). Since the end is
     * monotone in the means, the far sides cost nothing.
     */
    private OptionalDouble end(StudyCells cells, OutcomeRange range, AssumptionSet assumptions, EndRoute route, boolean upper) {
        if (route.form().isPresent()) {
            return OptionalDouble.of(formEnd(cells, range, assumptions, route.form().get(), upper));
        }
        EmpiricalBernsteinBoundary tail = tailBoundary(tails(cells, route));
        Optional<BoxProjection.Ends> ends = BoxProjection.study(cells, range, assumptions,
                arms -> oneSided(box(arms, range, assumptions, tail, route.movesWithShare()), range, upper),
                (units, all) -> share(units, all, tail));
        return ends.map(e -> OptionalDouble.of(upper ? e.upper() : e.lower())).orElseGet(OptionalDouble::empty);
    }

    /** One-sided bounds spent by one end of route 2: one per arm mean, two for p if needed, two per stratum share. */
    private static int tails(StudyCells cells, EndRoute route) {
        return Math.max(1, BoxProjection.cellCount(cells)) * (route.movesWithShare() ? 4 : 2) + 2 * BoxProjection.shareCount(cells);
    }

    /** The box stretched to the range ends on the side where the end does not move outward. */
    private static ObservablesBox oneSided(ObservablesBox box, OutcomeRange range, boolean upper) {
        return upper
                ? new ObservablesBox(box.pLow(), box.pHigh(), range.min(), box.mu1High(), box.mu0Low(), range.max())
                : new ObservablesBox(box.pLow(), box.pHigh(), box.mu1Low(), range.max(), range.min(), box.mu0High());
    }

    /**
     * The boxes of a study's cells: of the assumptions they depend only on {@code missing-at-random}
     * (through each arm's {@link dev.bracket.bounds.ArmMeanRange}), so a report's assumption sets
     * that agree on it share them (the last study's, compared by identity; threads that interleave
     * studies only compute them again).
     */
    private record CellBoxes(StudyCells cells, OutcomeRange range, EmpiricalBernsteinBoundary boundary,
                             boolean missingAtRandom, Map<ObservedArms, ObservablesBox> byCell, Map<Long, double[]> shares) {
    }

    /**
     * Which construction each end takes for some settings (route 1's quantities, or route 2's
     * {@link EndRoute}s), worked out from the assumptions alone by probing them; kept per settings.
     */
    private record Routes(Optional<EndQuantities> ends, EndRoute lower, EndRoute upper) {
        /** Route 2: the ends are not both per-unit means, and going separately gains on at least one. */
        boolean separate() {
            return ends.isEmpty() && (lower.separate() || upper.separate());
        }
    }

    private record RouteKey(OutcomeRange range, AssumptionSet assumptions, boolean known, boolean oneStratum) {
    }

    private Routes routes(OutcomeRange range, AssumptionSet assumptions, boolean known, boolean oneStratum) {
        RouteKey key = new RouteKey(range, assumptions, known, oneStratum);
        Routes found = routes.get(key);
        if (found == null) {
            if (routes.size() >= MAX_ROUTES) {
                routes.clear();
            }
            found = routes.computeIfAbsent(key, k -> new Routes(known ? EndQuantities.of(range, assumptions) : Optional.empty(),
                    EndRoute.of(range, assumptions, false, known, oneStratum), EndRoute.of(range, assumptions, true, known, oneStratum)));
        }
        return found;
    }

    private Map<ObservedArms, ObservablesBox> boxesOf(StudyCells cells, OutcomeRange range, AssumptionSet assumptions,
                                                      EmpiricalBernsteinBoundary boundary) {
        Map<ObservedArms, ObservablesBox> out = new IdentityHashMap<>();
        for (Map<String, ObservedArms> levels : cells.byStratum().values()) {
            for (ObservedArms arms : levels.values()) {
                if (arms.total() > 0) { // the projection skips cells without units
                    out.put(arms, box(arms, range, assumptions, boundary, true));
                }
            }
        }
        return out;
    }

    /** Each two-sided sequence of the box route: two one-sided bounds at {@code alpha / (2 sequences)}. */
    private EmpiricalBernsteinBoundary boxBoundary(int sequences) {
        return new EmpiricalBernsteinBoundary((1 - level) / (2.0 * sequences), plannedCount);
    }

    /**
     * The cell's box: sequences for p (treated indicators, all units; p at its estimate when
     * {@code withShare} is false) and for the ends of each arm's mean range.
     */
    private ObservablesBox box(ObservedArms arms, OutcomeRange range, AssumptionSet assumptions, EmpiricalBernsteinBoundary boundary,
                               boolean withShare) {
        long n = arms.total();
        double width = range.width();
        double pRadius = withShare ? boundary.radius(n, (double) arms.treated().units() * arms.control().units() / n, 1, 1) : 0;
        return ObservablesBox.of(arms, range, assumptions, arms.treatedShare(), pRadius,
                arm -> boundary.radius(arm.count(), variance.m2(arm, range), width, width));
    }

    private static ObservedArms filled(StudyCells cells, EndQuantities.PerUnit quantity, OutcomeRange range, boolean highest) {
        ObservedArms pooled = ObservedArms.empty();
        for (Map<String, ObservedArms> levels : cells.byStratum().values()) {
            for (ObservedArms arms : levels.values()) {
                pooled = pooled.merge(quantity.filled(arms, range, highest));
            }
        }
        return pooled;
    }

    /** A stratum share's sequence, on the indicators of belonging to the stratum. */
    private static double[] share(long units, long all, EmpiricalBernsteinBoundary boundary) {
        double w = (double) units / all;
        double r = boundary.radius(all, (double) units * (all - units) / all, 1, 1);
        return new double[] {w - r, w + r};
    }

    private ConfidenceBand band(Optional<BoxProjection.Ends> ends, String basis) {
        return ends.map(e -> ConfidenceBand.of(BandMethod.ANYTIME, level, e.lower(), e.upper(), basis))
                .orElseGet(() -> ConfidenceBand.refuted(BandMethod.ANYTIME, level, basis));
    }

    private String separateBasis(StudyCells cells, EndRoute lowerRoute, EndRoute upperRoute) {
        List<Object> shape = List.of(lowerRoute, upperRoute, BoxProjection.cellCount(cells), BoxProjection.shareCount(cells));
        return separateBases.computeIfAbsent(shape, k -> String.format(Locale.ROOT,
                "time-uniform empirical-Bernstein confidence sequences (Howard et al. 2021), each end of the interval on its own "
                        + "at half the error: %s; %s; from counts, means, %s and the declared range; tuned for %d observations",
                endText("lower", lowerRoute, cells), endText("upper", upperRoute, cells),
                variance == VarianceBasis.SAMPLE ? "observed spreads" : "the largest spreads the range allows", plannedCount));
    }

    private static String endText(String which, EndRoute route, StudyCells cells) {
        if (route.form().isPresent()) {
            EndQuantities.Form form = route.form().get();
            int means = form.treatedMean() - form.controlMean();
            return means == 0 ? "the " + which + " end on its per-unit quantity over all units"
                    : String.format(Locale.ROOT, "the %s end from one-sided bounds on %s%s", which,
                    form.quantityIsZero() ? "" : "a per-unit quantity over all units and on ",
                    means == 2 ? "both arms' means" : form.treatedMean() != 0 ? "the treated arm's mean" : "the control arm's mean");
        }
        boolean shares = BoxProjection.shareCount(cells) > 0;
        return String.format(Locale.ROOT, "the %s end from one-sided bounds on each arm's mean%s in every cell%s (error split over %d bounds)",
                which, route.movesWithShare() ? " and two-sided ones on the treated share" : "",
                shares ? " and on the stratum shares" : "", tails(cells, route));
    }

    private String basis(boolean perEnd, boolean shares, int sequences) {
        String what = perEnd
                ? "one for each end of the interval, on that end's per-unit quantity over all units"
                : "for the treated share and each arm's mean in every cell" + (shares ? " and the stratum shares" : "");
        return String.format(Locale.ROOT,
                "time-uniform empirical-Bernstein confidence sequences (Howard et al. 2021), %s; from counts, means, "
                        + "%s and the declared range; error split over %d sequences; tuned for %d observations",
                what, variance == VarianceBasis.SAMPLE ? "observed spreads" : "the largest spreads the range allows",
                sequences, plannedCount);
    }
}
