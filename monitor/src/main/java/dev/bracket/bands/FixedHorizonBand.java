package dev.bracket.bands;

import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.BoundCalculator;
import dev.bracket.bounds.BoundStatus;
import dev.bracket.bounds.IdentifiedInterval;
import dev.bracket.bounds.ObservablesBox;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.bounds.StratifiedBounds;
import dev.bracket.bounds.StudyCells;
import org.apache.commons.math3.distribution.NormalDistribution;

import java.util.ArrayList;
import java.util.EnumMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.concurrent.ConcurrentHashMap;

/**
 * The fixed-horizon band: with probability at least {@code level} (asymptotically) it holds the
 * true ATE, at one look planned in advance. Looking again as data accrue raises the error rate
 * far above {@code 1 - level}; streams use {@link AnytimeBand} for decisions.
 *
 * <p>Three cases:
 * <ol>
 *   <li>One cell, or strata without instrument levels, with an estimated interval compatible
 *       with the assumptions: {@link ImbensManski} (with Stoye's pre-test) around the estimated
 *       interval, with {@link EndpointStandardErrors}. For strata the ends are the share-weighted
 *       sums of the stratum ends (as in {@link StratifiedBounds}) with shares estimated from the
 *       same sample, so by the delta method (van der Vaart 1998, Thm 3.1; multinomial shares,
 *       stratum estimates independent given the counts) each end {@code L = sum w_s L_s} has
 *       <pre>
 *   Var(L^) = sum_s w_s^2 se(L_s)^2 + sum_s w_s (L_s - L)^2 / n
 *       </pre>
 *       the second term being the sampling of the shares: the variance of the per-unit stratum
 *       end, which ignoring would leave the band too short whenever stratum intervals differ.</li>
 *   <li>Instrument levels: the intersection over levels is a max/min of noisy cells, which is
 *       not smooth and is biased towards narrow intervals. Instead every cell gets a Wald box for
 *       (p, mu1, mu0) and every stratum share (when there are several strata) an interval, at
 *       error {@code alpha / (3 K + S)} each (Bonferroni over K cells and S shares) — Wilson
 *       (1927, JASA 22(158)) score intervals for p and the shares, normal intervals for the means
 *       — and {@link BoxProjection} gives the band. Conservative: it covers the whole identified set.</li>
 *   <li>The estimate itself refutes the assumptions (for example {@code mu1^ < mu0^} under
 *       {@code mtr-positive,mts-positive}): there are no estimated ends to centre on, so the
 *       Wald-box projection is used as in case 2; the band is refuted when no point of the boxes
 *       is compatible with the assumptions (a test at level alpha), and otherwise spans the
 *       intervals compatible with the data.</li>
 * </ol>
 * Pending outcomes (exposed units without an outcome yet) take case 2's route as well: each
 * arm's box runs from the low end of its arm-mean range minus a normal radius to the high end
 * plus one, the ends being means of per-unit quantities with a pending unit at a or b
 * (see {@link ObservablesBox#of}).
 *
 * <p>Insufficient data when an arm of any cell has a single observed outcome, or the interval
 * itself is insufficient data.
 */
public final class FixedHorizonBand {

    private static final NormalDistribution STANDARD_NORMAL = new NormalDistribution(0, 1);
    /** Built once: the text is the same for every band of a variance basis. */
    private static final Map<VarianceBasis, String> DELTA_BASIS = new EnumMap<>(VarianceBasis.class);

    static {
        for (VarianceBasis v : VarianceBasis.values()) {
            DELTA_BASIS.put(v, describeDelta(v));
        }
    }

    /** Quantiles and descriptions of projection bands by settings: computed once, not per band. */
    private static final Map<ProjectionKey, Projection> PROJECTIONS = new ConcurrentHashMap<>();
    private static final int MAX_PROJECTIONS = 256;

    private FixedHorizonBand() {
    }

    /** The band of a whole study. */
    public static ConfidenceBand of(StudyCells cells, OutcomeRange range, AssumptionSet assumptions, double level,
                                    VarianceBasis variance) {
        return of(cells, range, assumptions, level, variance, StratifiedBounds.interval(cells, range, assumptions).overall());
    }

    /** The same, given the study's estimated interval (to spare computing it again). */
    public static ConfidenceBand of(StudyCells cells, OutcomeRange range, AssumptionSet assumptions, double level,
                                    VarianceBasis variance, IdentifiedInterval estimate) {
        // A stratum seen in one arm only has no sampling model here for its missing mean: no band yet.
        if (estimate.status() == BoundStatus.INSUFFICIENT_DATA || hasSingleUnitArm(cells) || !StratifiedBounds.oneArmed(cells).isEmpty()) {
            return ConfidenceBand.insufficientData(BandMethod.FIXED_HORIZON, level, deltaBasis(variance));
        }
        if (estimate.isBounded() && !cells.hasPending() && oneLevelPerStratum(cells)) {
            Optional<ConfidenceBand> band = imbensManski(cells, range, assumptions, level, variance);
            if (band.isPresent()) {
                return band.get();
            }
        }
        return projection(cells, range, assumptions, level, variance);
    }

    /** The band of a single cell; the same as {@link #of} for {@code StudyCells.single(arms)}, without the bookkeeping. */
    public static ConfidenceBand ofCell(ObservedArms arms, OutcomeRange range, AssumptionSet assumptions, double level,
                                        VarianceBasis variance) {
        if (arms.hasEmptyArm() || hasSingleUnitArm(arms)) {
            return ConfidenceBand.insufficientData(BandMethod.FIXED_HORIZON, level, deltaBasis(variance));
        }
        IdentifiedInterval estimate = BoundCalculator.interval(arms, range, assumptions);
        Optional<EndpointStandardErrors> se = estimate.isBounded() && arms.pending() == 0
                ? EndpointStandardErrors.of(arms, range, assumptions, variance) : Optional.empty();
        if (se.isPresent()) {
            return imbensManski(estimate.lower(), estimate.upper(), se.get().lower(), se.get().upper(), arms.total(),
                    range, level, variance);
        }
        return projection(StudyCells.single(arms), range, assumptions, level, variance);
    }

    /** Strata without instrument levels: share-weighted ends and variances; empty if a stratum has no standard errors. */
    private static Optional<ConfidenceBand> imbensManski(StudyCells cells, OutcomeRange range, AssumptionSet assumptions,
                                                         double level, VarianceBasis variance) {
        long total = cells.pooled().total();
        double lower = 0;
        double upper = 0;
        double varLower = 0;
        double varUpper = 0;
        List<double[]> strata = new ArrayList<>(); // {weight, lower end, upper end}
        for (Map<String, ObservedArms> levels : cells.byStratum().values()) {
            ObservedArms arms = levels.values().iterator().next();
            if (arms.total() == 0) {
                continue; // weight zero, as in StratifiedBounds
            }
            IdentifiedInterval iv = BoundCalculator.interval(arms, range, assumptions);
            Optional<EndpointStandardErrors> se = EndpointStandardErrors.of(arms, range, assumptions, variance);
            if (!iv.isBounded() || se.isEmpty()) {
                return Optional.empty();
            }
            double w = (double) arms.total() / total;
            lower += w * iv.lower();
            upper += w * iv.upper();
            varLower += w * w * se.get().lower() * se.get().lower();
            varUpper += w * w * se.get().upper() * se.get().upper();
            strata.add(new double[] {w, iv.lower(), iv.upper()});
        }
        for (double[] s : strata) { // the shares' own sampling variance
            varLower += s[0] * (s[1] - lower) * (s[1] - lower) / total;
            varUpper += s[0] * (s[2] - upper) * (s[2] - upper) / total;
        }
        return Optional.of(imbensManski(lower, upper, Math.sqrt(varLower), Math.sqrt(varUpper), total, range, level, variance));
    }

    private static ConfidenceBand imbensManski(double lower, double upper, double seLower, double seUpper, long n,
                                               OutcomeRange range, double level, VarianceBasis variance) {
        double[] band = ImbensManski.interval(lower, upper, seLower, seUpper, level, n);
        // No ATE lies outside [-(b-a), b-a]; clipping keeps the band honest at tiny samples.
        return ConfidenceBand.of(BandMethod.FIXED_HORIZON, level,
                Math.max(band[0], -range.width()), Math.min(band[1], range.width()), deltaBasis(variance));
    }

    private static ConfidenceBand projection(StudyCells cells, OutcomeRange range, AssumptionSet assumptions, double level,
                                             VarianceBasis variance) {
        ProjectionKey key = new ProjectionKey(level, BoxProjection.cellCount(cells), BoxProjection.shareCount(cells), variance);
        Projection settings = PROJECTIONS.get(key);
        if (settings == null) {
            if (PROJECTIONS.size() >= MAX_PROJECTIONS) {
                PROJECTIONS.clear();
            }
            settings = PROJECTIONS.computeIfAbsent(key, ProjectionKey::settings);
        }
        double z = settings.z();
        String basis = settings.basis();
        return BoxProjection.study(cells, range, assumptions, arms -> waldBox(arms, range, assumptions, z, variance),
                        (units, all) -> wilson((double) units / all, all, z))
                .map(e -> ConfidenceBand.of(BandMethod.FIXED_HORIZON, level, e.lower(), e.upper(), basis))
                .orElseGet(() -> ConfidenceBand.refuted(BandMethod.FIXED_HORIZON, level, basis));
    }

    /** What a projection band's settings fix: the number of cells and stratum shares, level and variance basis. */
    private record ProjectionKey(double level, int cells, int shares, VarianceBasis variance) {

        /** Each box's normal quantile (Bonferroni over 3 per cell and one per share) and the band's description. */
        Projection settings() {
            double z = STANDARD_NORMAL.inverseCumulativeProbability(1 - (1 - level) / (2.0 * (3 * cells + shares)));
            String basis = "Bonferroni projection of normal confidence boxes for the treated share and the arm means of "
                    + cells + (cells == 1 ? " cell" : " cells") + (shares > 0 ? " and the " + shares + " stratum shares" : "")
                    + " (conservative), using " + variance.description();
            return new Projection(z, basis);
        }
    }

    private record Projection(double z, String basis) {
    }

    /** Wilson score interval for p and normal intervals for the means, each two-sided with quantile z. */
    static ObservablesBox waldBox(ObservedArms arms, OutcomeRange range, AssumptionSet assumptions, double z, VarianceBasis variance) {
        double[] p = wilson(arms.treatedShare(), arms.total(), z);
        return ObservablesBox.of(arms, range, assumptions, (p[0] + p[1]) / 2, (p[1] - p[0]) / 2,
                arm -> meanRadius(arm, range, z, variance));
    }

    /** Wilson's score interval {low, high} for a proportion {@code p} of {@code n}, two-sided with quantile z. */
    private static double[] wilson(double p, double n, double z) {
        double z2n = z * z / n;
        double centre = (p + z2n / 2) / (1 + z2n);
        double half = z / (1 + z2n) * Math.sqrt(p * (1 - p) / n + z2n / (4 * n));
        return new double[] {centre - half, centre + half};
    }

    private static double meanRadius(ArmStatistics arm, OutcomeRange range, double z, VarianceBasis variance) {
        return z * Math.sqrt(variance.variance(arm, range) / arm.count());
    }

    private static boolean hasSingleUnitArm(StudyCells cells) {
        for (Map<String, ObservedArms> levels : cells.byStratum().values()) {
            for (ObservedArms arms : levels.values()) {
                if (hasSingleUnitArm(arms)) {
                    return true;
                }
            }
        }
        return false;
    }

    private static boolean oneLevelPerStratum(StudyCells cells) {
        for (Map<String, ObservedArms> levels : cells.byStratum().values()) {
            if (levels.size() != 1) {
                return false;
            }
        }
        return true;
    }

    private static boolean hasSingleUnitArm(ObservedArms arms) {
        return arms.treated().count() == 1 || arms.control().count() == 1;
    }

    private static String deltaBasis(VarianceBasis variance) {
        return DELTA_BASIS.get(variance);
    }

    private static String describeDelta(VarianceBasis variance) {
        return "Imbens-Manski (2004) interval with Stoye's (2009) width pre-test; delta-method standard errors from "
                + variance.description() + "; valid at one planned look";
    }
}
