package dev.bracket.bands;

import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.BoundStatus;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.bounds.StratifiedBounds;
import dev.bracket.bounds.StudyCells;

import java.util.Locale;
import java.util.Optional;

/**
 * The anytime-valid band: with probability at least {@code level}, at every look at once, the
 * band holds the whole identified set. Looking after every event, stopping when a result looks
 * interesting, or continuing when it does not, all keep this guarantee; it is the band alerts use.
 *
 * <p>Construction (DESIGN.md §3). In each cell (stratum × instrument level) three confidence
 * sequences run at once, each at error {@code alpha / (3 K)} for K cells (Bonferroni): one for the
 * treated share p over all of the cell's units, and one for each arm's mean over that arm's
 * units alone, all from {@link NormalMixtureBoundary} (Howard et al. 2021, Ann. Statist. 49(2))
 * on outcomes rescaled to [0, 1] by the declared range. With probability at least 1 - alpha every
 * true (p, mu1, mu0) stays in its box forever; {@link BoxProjection} turns the boxes into the band.
 * For one cell this is DESIGN.md's corner rule (lower end: mu1 low, mu0 high; upper end: mu1 high,
 * mu0 low; p at either end), extended to the points where the box meets {@code mu1 = mu0} so
 * that corners where the assumptions are refuted are handled. Strata are weighted by their
 * observed shares, as in {@link StratifiedBounds}: the band covers the ATE of a population with
 * the observed stratum mix (sampling variation of the shares is not included).
 *
 * <p>Inputs are the per-arm count and mean of each cell ({@code count * mean} is the arm's sum):
 * statistics that merge across partitions, with no observation history and no dependence on the
 * order of arrival; the outcome spread is not used (the range bounds it). With pending outcomes
 * the sequences for an arm run on the ends of its {@link dev.bracket.bounds.ArmMeanRange} (each
 * pending unit counted at a or at b), over the arm's exposed units. The boundary's tuning
 * parameter is fixed by {@code plannedCount}, chosen before the data are seen.
 *
 * <p>Immutable and thread-safe; build one per configured level and reuse it.
 */
public final class AnytimeBand {

    /** Default tuning: tightest around ten thousand observations per sequence (a choice, no source). */
    public static final long DEFAULT_PLANNED_COUNT = 10_000;

    private final double level;
    private final long plannedCount;
    private final NormalMixtureBoundary singleCellBoundary;
    private final String singleCellBasis;

    /**
     * @param level        confidence level 1 - alpha, in (0, 1)
     * @param plannedCount number of observations per sequence at which the boundary is tightest
     */
    public AnytimeBand(double level, long plannedCount) {
        if (!(level > 0 && level < 1)) {
            throw new IllegalArgumentException("level must lie strictly between 0 and 1, was " + level);
        }
        if (plannedCount < 1) {
            throw new IllegalArgumentException("planned count must be >= 1, was " + plannedCount);
        }
        this.level = level;
        this.plannedCount = plannedCount;
        this.singleCellBoundary = boundary(1);
        this.singleCellBasis = basis(1);
    }

    public AnytimeBand(double level) {
        this(level, DEFAULT_PLANNED_COUNT);
    }

    public double level() {
        return level;
    }

    public long plannedCount() {
        return plannedCount;
    }

    /** The band of a whole study (strata and instrument levels by Bonferroni over cells). */
    public ConfidenceBand of(StudyCells cells, OutcomeRange range, AssumptionSet assumptions) {
        int k = Math.max(1, BoxProjection.cellCount(cells));
        String basis = k == 1 ? singleCellBasis : basis(k);
        if (StratifiedBounds.interval(cells, range, assumptions).overall().status() == BoundStatus.INSUFFICIENT_DATA) {
            return ConfidenceBand.insufficientData(BandMethod.ANYTIME, level, basis);
        }
        NormalMixtureBoundary boundary = k == 1 ? singleCellBoundary : boundary(k);
        return band(BoxProjection.study(cells, range, assumptions, arms -> box(arms, range, assumptions, boundary)), basis);
    }

    /** The band of a single cell; the same as {@link #of} for {@code StudyCells.single(arms)}, without the bookkeeping. */
    public ConfidenceBand ofCell(ObservedArms arms, OutcomeRange range, AssumptionSet assumptions) {
        if (arms.hasEmptyArm()) {
            return ConfidenceBand.insufficientData(BandMethod.ANYTIME, level, singleCellBasis);
        }
        return band(BoxProjection.cell(box(arms, range, assumptions, singleCellBoundary), range, assumptions), singleCellBasis);
    }

    /** The sequence each of the {@code 3 * cells} quantities gets. */
    NormalMixtureBoundary boundary(int cells) {
        return NormalMixtureBoundary.tunedFor((1 - level) / (3.0 * cells), plannedCount);
    }

    /** The cell's box: confidence sequences for p (over all units) and the ends of each arm's mean range. */
    static ObservablesBox box(ObservedArms arms, OutcomeRange range, AssumptionSet assumptions, NormalMixtureBoundary boundary) {
        double width = range.width();
        return ObservablesBox.of(arms, range, assumptions, arms.treatedShare(), boundary.radius(arms.total()),
                arm -> width * boundary.radius(arm.count()));
    }

    private ConfidenceBand band(Optional<BoxProjection.Ends> ends, String basis) {
        return ends.map(e -> ConfidenceBand.of(BandMethod.ANYTIME, level, e.lower(), e.upper(), basis))
                .orElseGet(() -> ConfidenceBand.refuted(BandMethod.ANYTIME, level, basis));
    }

    private String basis(int cells) {
        return String.format(Locale.ROOT,
                "time-uniform confidence sequences (sub-Gaussian normal mixture, Howard et al. 2021) for the treated share "
                        + "and each arm's mean, from counts, means and the declared range only (no standard deviation needed); "
                        + "error split over %d sequences; tuned for %d observations",
                3 * cells, plannedCount);
    }
}
