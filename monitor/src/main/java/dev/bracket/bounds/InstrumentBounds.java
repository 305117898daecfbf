package dev.bracket.bounds;

import java.util.Collections;
import java.util.LinkedHashMap;
import java.util.Map;
import java.util.Optional;

/**
 * Bounds under mean independence of the potential outcomes from an instrument Z (Manski 1990,
 * AER P&amp;P 80(2); Manski 2003, <i>Partial Identification of Probability Distributions</i>, ch. 2):
 * {@code E[Y1 | Z = z] = E[Y1]} and {@code E[Y0 | Z = z] = E[Y0]} for every level z.
 *
 * <p>At each level the chosen assumptions bound the two potential-outcome means,
 *
 * <pre>
 *   E[Y1 | z] in [p_z*mu1_z + (1-p_z)*m10Low_z,  p_z*mu1_z + (1-p_z)*m10High_z]
 *   E[Y0 | z] in [(1-p_z)*mu0_z + p_z*m01Low_z,  (1-p_z)*mu0_z + p_z*m01High_z]
 * </pre>
 *
 * and mean independence intersects them over levels:
 * {@code E[Y1] in [max_z L1_z, min_z U1_z]}, likewise for E[Y0]; then
 * {@code ATE in [L1 - U0, U1 - L0]}. An empty intersection refutes the instrument together
 * with the assumptions. With {@code worst-case} alone these are Manski's sharp mean-independence
 * bounds; combined with other assumptions they remain valid (they are an outer set), but
 * sharpness is not claimed.
 *
 * <p>A level may have units in one arm only (for example nobody assigned to control could get
 * treatment); the empty arm then carries no weight there and constraints on its mean are
 * vacuous. Levels with no units are skipped.
 *
 * <p>Pending outcomes: each level's bounds are taken over its box of arm means
 * ({@link ArmMeanRange}, {@link MeanVertices}), smallest lower and largest upper bound of each
 * potential-outcome mean. Under {@code worst-case} alone the bounds on E[Y1 | z] depend on mu1_z
 * only and those on E[Y0 | z] on mu0_z only, so this is still Manski's sharp set; otherwise an
 * outer set.
 */
public final class InstrumentBounds {

    private InstrumentBounds() {
    }

    /**
     * Bounds on the two potential-outcome means at one instrument level:
     * {@code E[Y1 | z] in [y1Low, y1High]} and {@code E[Y0 | z] in [y0Low, y0High]}.
     */
    public record LevelMeans(double y1Low, double y1High, double y0Low, double y0High) {
    }

    /** Per-level bounds on E[Y1] and E[Y0]; null when the level's assumptions are refuted. */
    static LevelMeans levelMeans(ObservedArms arms, OutcomeRange range, AssumptionSet assumptions) {
        ArmMeanRange t = ArmMeanRange.of(arms.treated(), range, assumptions);
        ArmMeanRange c = ArmMeanRange.of(arms.control(), range, assumptions);
        boolean noTreated = arms.treated().units() == 0;
        boolean noControl = arms.control().units() == 0;
        double mu1Low = noTreated ? Double.NaN : t.lowMean(range);
        double mu1High = noTreated ? Double.NaN : t.highMean(range);
        double mu0Low = noControl ? Double.NaN : c.lowMean(range);
        double mu0High = noControl ? Double.NaN : c.highMean(range);
        if (mu1Low == mu1High && mu0Low == mu0High) {
            // every vertex is this point: the usual case, no pending outcomes
            return levelMeans(arms.treatedShare(), mu1Low, mu0Low, range, assumptions).orElse(null);
        }
        // Over the box of arm means (pending outcomes): the smallest and largest of each bound.
        double[][] vertices = MeanVertices.of(mu1Low, mu1High, mu0Low, mu0High);
        LevelMeans hull = null;
        for (double[] m : vertices) {
            LevelMeans at = levelMeans(arms.treatedShare(), m[0], m[1], range, assumptions).orElse(null);
            if (at != null) {
                hull = hull == null ? at : new LevelMeans(Math.min(hull.y1Low, at.y1Low), Math.max(hull.y1High, at.y1High),
                        Math.min(hull.y0Low, at.y0Low), Math.max(hull.y0High, at.y0High));
            }
        }
        return hull;
    }

    /**
     * Per-level bounds as a function of the level's observable quantities (treated share and arm
     * means; a NaN mean marks an arm with no units). Empty when the assumptions are refuted at
     * these values. Like {@link BoundCalculator#interval(double, double, double, OutcomeRange,
     * AssumptionSet)} the ends are linear in {@code p} for fixed means; the confidence bands rely on it.
     */
    public static Optional<LevelMeans> levelMeans(double p, double mu1, double mu0, OutcomeRange range, AssumptionSet assumptions) {
        double q = 1 - p;
        UnobservedMeans box = assumptions.constrain(range, mu1, mu0);
        if (box.isEmpty(range.roundingSlack())) {
            return Optional.empty();
        }
        double treatedPart = p == 0 ? 0 : p * mu1;
        double controlPart = q == 0 ? 0 : q * mu0;
        return Optional.of(new LevelMeans(
                treatedPart + q * box.m10Low(), treatedPart + q * box.m10High(),
                controlPart + p * box.m01Low(), controlPart + p * box.m01High()));
    }

    /**
     * The ATE interval under mean independence over the given levels (level name to that level's
     * arms). Insufficient data unless both arms have units somewhere and some level has units.
     */
    public static IdentifiedInterval interval(Map<String, ObservedArms> levels, OutcomeRange range, AssumptionSet assumptions) {
        return intervalWithLevels(levels, range, assumptions).overall();
    }

    /** The ATE interval together with the per-level ATE intervals (before intersection). */
    public static Result intervalWithLevels(Map<String, ObservedArms> levels, OutcomeRange range, AssumptionSet assumptions) {
        long treated = 0;
        long control = 0;
        double l1 = Double.NEGATIVE_INFINITY;
        double u1 = Double.POSITIVE_INFINITY;
        double l0 = Double.NEGATIVE_INFINITY;
        double u0 = Double.POSITIVE_INFINITY;
        boolean refuted = false;
        Map<String, IdentifiedInterval> perLevel = new LinkedHashMap<>();
        for (Map.Entry<String, ObservedArms> e : levels.entrySet()) {
            ObservedArms arms = e.getValue();
            if (arms.total() == 0) {
                perLevel.put(e.getKey(), IdentifiedInterval.insufficientData());
                continue;
            }
            treated += arms.treated().units();
            control += arms.control().units();
            LevelMeans m = levelMeans(arms, range, assumptions);
            if (m == null) {
                refuted = true;
                perLevel.put(e.getKey(), IdentifiedInterval.refuted());
                continue;
            }
            perLevel.put(e.getKey(), IdentifiedInterval.spanning(m.y1Low - m.y0High, m.y1High - m.y0Low));
            l1 = Math.max(l1, m.y1Low);
            u1 = Math.min(u1, m.y1High);
            l0 = Math.max(l0, m.y0Low);
            u0 = Math.min(u0, m.y0High);
        }
        IdentifiedInterval overall;
        if (treated == 0 || control == 0) {
            overall = IdentifiedInterval.insufficientData();
        } else if (refuted || l1 - u1 > range.roundingSlack() || l0 - u0 > range.roundingSlack()) {
            overall = IdentifiedInterval.refuted();
        } else {
            overall = IdentifiedInterval.spanning(l1 - u0, u1 - l0);
        }
        return new Result(overall, perLevel);
    }

    /** The intersected interval and the interval each level alone would give. */
    public record Result(IdentifiedInterval overall, Map<String, IdentifiedInterval> perLevel) {
        public Result {
            perLevel = Collections.unmodifiableMap(new LinkedHashMap<>(perLevel));
        }
    }
}
