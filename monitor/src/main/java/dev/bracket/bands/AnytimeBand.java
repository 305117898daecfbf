package dev.bracket.bands;

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
import java.util.concurrent.ConcurrentHashMap;

/**
 * The anytime-valid band: with probability at least {@code level}, at every look at once, the
 * band holds the whole identified set of the population. Looking after every event, stopping when
 * a result looks interesting, or continuing when it does not, all keep this guarantee; it is the
 * band alerts use.
 *
 * <p>Every sequence is an {@link EmpiricalBernsteinBoundary} (Howard, Ramdas, McAuliffe &amp;
 * Sekhon 2021, Ann. Statist. 49(2), Thm 4, with Fan et al.'s 2015 inequality): finite-sample
 * valid for any law in the declared range, and as narrow as the data's spread allows. Two
 * constructions:
 * <ol>
 *   <li>One sequence per end. When each end is the mean of a per-unit quantity
 *       ({@link EndQuantities}: worst case, monotone response, optimizing selection and their
 *       combinations, without instrument levels), a lower bound for the lower end's quantity and
 *       an upper bound for the upper end's, each at error {@code alpha / 2}, on all units pooled.
 *       Pooling is exact for strata: the quantity is the same in every stratum, so its pooled
 *       mean is the population-share-weighted sum of the stratum ends.</li>
 *   <li>Otherwise a box per cell (stratum × instrument level): two-sided sequences for the
 *       treated share and each arm's mean, and one per stratum share when there are several
 *       strata, each at error {@code alpha / (3 K + S)} for K cells and S shares (Bonferroni);
 *       {@link BoxProjection} turns the boxes into the band, and says "refuted" when no point
 *       of some box is compatible with the assumptions.</li>
 * </ol>
 * In both cases, if every sequence holds its truth, the band holds the identified set, so the
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
 * sequence runs over all units ({@link EndQuantities.PerUnit#filled}). In route 2 each arm's box
 * runs from the low end of its arm-mean range (pending units at a) to the high end (at b), each a
 * mean of bounded per-unit quantities. Under {@code missing-at-random} a pending unit's quantity
 * is not known at all, so pending outcomes then take route 2, whose arm boxes come from the
 * observed outcomes alone and the treated share from all units.
 *
 * <p>Thread-safe; its results depend on its settings only (it keeps what it built for earlier bands:
 * boundaries, descriptions and the last study's cell boxes, the latter also keyed on whether the
 * assumptions include {@code missing-at-random}, which changes the boxes of pending outcomes);
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
    private volatile CellBoxes lastBoxes;

    /** Bands by settings: building one costs more than a band, and the settings rarely change. */
    private static final Map<List<Object>, AnytimeBand> SHARED = new ConcurrentHashMap<>();
    private static final int MAX_SHARED = 16;

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
        List<Object> key = List.of(level, plannedCount, variance);
        AnytimeBand band = SHARED.get(key);
        if (band == null) {
            if (SHARED.size() >= MAX_SHARED) {
                SHARED.clear();
            }
            band = SHARED.computeIfAbsent(key, k -> new AnytimeBand(level, plannedCount, variance));
        }
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
        Optional<EndQuantities> ends = levels || unknownPendingQuantities(cells, assumptions)
                ? Optional.empty() : EndQuantities.of(range, assumptions);
        int shares = BoxProjection.shareCount(cells);
        int sequences = ends.isPresent() ? 2 : 3 * Math.max(1, BoxProjection.cellCount(cells)) + shares;
        String basis = ends.isPresent() ? perEndBasis
                : sequences == 3 ? singleCellBoxBasis
                : boxBases.computeIfAbsent(2 * sequences + (shares > 0 ? 1 : 0), k -> basis(false, shares > 0, sequences));
        // A stratum seen in one arm only has no box for its missing arm: no band until both arms are seen.
        if (estimate.status() == BoundStatus.INSUFFICIENT_DATA || !StratifiedBounds.oneArmed(cells).isEmpty()) {
            return ConfidenceBand.insufficientData(BandMethod.ANYTIME, level, basis);
        }
        if (ends.isPresent()) {
            return perEnd(cells, range, ends.get(), basis);
        }
        EmpiricalBernsteinBoundary boundary = sequences == 3 ? singleCellBox : boxBoundaries.computeIfAbsent(sequences, this::boxBoundary);
        CellBoxes boxes = lastBoxes;
        boolean missingAtRandom = assumptions.contains(Assumption.MISSING_AT_RANDOM);
        if (boxes == null || boxes.cells() != cells || !boxes.range().equals(range) || boxes.boundary() != boundary
                || boxes.missingAtRandom() != missingAtRandom) {
            boxes = new CellBoxes(cells, range, boundary, missingAtRandom, boxesOf(cells, range, assumptions, boundary));
            lastBoxes = boxes;
        }
        return band(BoxProjection.study(cells, range, assumptions, boxes.byCell()::get,
                (units, all) -> share(units, all, boundary)), basis);
    }

    /** The band of a single cell; the same as {@link #of} for {@code StudyCells.single(arms)}, without the bookkeeping. */
    public ConfidenceBand ofCell(ObservedArms arms, OutcomeRange range, AssumptionSet assumptions) {
        Optional<EndQuantities> ends = unknownPendingQuantities(StudyCells.single(arms), assumptions)
                ? Optional.empty() : EndQuantities.of(range, assumptions);
        String basis = ends.isPresent() ? perEndBasis : singleCellBoxBasis;
        if (arms.hasEmptyArm()) {
            return ConfidenceBand.insufficientData(BandMethod.ANYTIME, level, basis);
        }
        if (ends.isPresent()) {
            return perEnd(StudyCells.single(arms), range, ends.get(), basis);
        }
        return band(BoxProjection.cell(box(arms, range, assumptions, singleCellBox), range, assumptions), basis);
    }

    /** Missing-at-random with pending outcomes: a pending unit's per-unit quantity is unknown (route 2). */
    private static boolean unknownPendingQuantities(StudyCells cells, AssumptionSet assumptions) {
        return assumptions.contains(Assumption.MISSING_AT_RANDOM) && cells.hasPending();
    }

    /**
     * Lower bound of the lower end's quantity, upper bound of the upper end's, on the pooled units,
     * each cell's pending units filled in at that end's extreme before pooling.
     */
    private ConfidenceBand perEnd(StudyCells cells, OutcomeRange range, EndQuantities ends, String basis) {
        EndQuantities.Summary lo = ends.lower().over(filled(cells, ends.lower(), range, false), range, variance);
        EndQuantities.Summary hi = ends.upper().over(filled(cells, ends.upper(), range, true), range, variance);
        double loMin = ends.lower().min(range);
        double hiMax = ends.upper().max(range);
        double lower = lo.mean() - perEnd.radius(lo.count(), lo.m2(), ends.lower().max(range) - loMin, lo.mean() - loMin);
        double upper = hi.mean() + perEnd.radius(hi.count(), hi.m2(), hiMax - ends.upper().min(range), hiMax - hi.mean());
        return ConfidenceBand.of(BandMethod.ANYTIME, level, lower, Math.max(lower, upper), basis);
    }

    /**
     * The boxes of a study's cells: of the assumptions they depend only on {@code missing-at-random}
     * (through each arm's {@link dev.bracket.bounds.ArmMeanRange}), so a report's assumption sets
     * that agree on it share them (the last study's, compared by identity; threads that interleave
     * studies only compute them again).
     */
    private record CellBoxes(StudyCells cells, OutcomeRange range, EmpiricalBernsteinBoundary boundary,
                             boolean missingAtRandom, Map<ObservedArms, ObservablesBox> byCell) {
    }

    private Map<ObservedArms, ObservablesBox> boxesOf(StudyCells cells, OutcomeRange range, AssumptionSet assumptions,
                                                      EmpiricalBernsteinBoundary boundary) {
        Map<ObservedArms, ObservablesBox> out = new IdentityHashMap<>();
        for (Map<String, ObservedArms> levels : cells.byStratum().values()) {
            for (ObservedArms arms : levels.values()) {
                if (arms.total() > 0) { // the projection skips cells without units
                    out.put(arms, box(arms, range, assumptions, boundary));
                }
            }
        }
        return out;
    }

    /** Each two-sided sequence of the box route: two one-sided bounds at {@code alpha / (2 sequences)}. */
    private EmpiricalBernsteinBoundary boxBoundary(int sequences) {
        return new EmpiricalBernsteinBoundary((1 - level) / (2.0 * sequences), plannedCount);
    }

    /** The cell's box: sequences for p (treated indicators, all units) and for the ends of each arm's mean range. */
    private ObservablesBox box(ObservedArms arms, OutcomeRange range, AssumptionSet assumptions, EmpiricalBernsteinBoundary boundary) {
        long n = arms.total();
        double width = range.width();
        double pRadius = boundary.radius(n, (double) arms.treated().units() * arms.control().units() / n, 1, 1);
        return ObservablesBox.of(arms, range, assumptions, arms.treatedShare(), pRadius,
                arm -> boundary.radius(arm.count(), variance.m2(arm, range), width, width));
    }

    private static ObservedArms filled(StudyCells cells, EndQuantities.PerUnit quantity, OutcomeRange range, boolean highest) {
        return cells.byStratum().values().stream().flatMap(levels -> levels.values().stream())
                .map(arms -> quantity.filled(arms, range, highest))
                .reduce(ObservedArms.empty(), ObservedArms::merge);
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
