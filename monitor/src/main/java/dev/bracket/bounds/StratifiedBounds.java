package dev.bracket.bounds;

import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;

/**
 * Bounds for a study whose units fall into strata (sites, regions, risk groups). Within a
 * stratum the cell's bounds come from {@link BoundCalculator}, or, when the stratum has instrument
 * levels, from the bounds of the set's {@link InstrumentAssumption} ({@link InstrumentBounds} or
 * {@link IndependentInstrumentBounds}). The population ATE is the share-weighted sum of the
 * stratum ATEs, so its identified set is the share-weighted sum of the stratum intervals:
 *
 * <pre>
 *   [ sum_s w_s * lower_s ,  sum_s w_s * upper_s ],   w_s = n_s / n
 * </pre>
 *
 * (Minkowski sum of intervals scaled by the known stratum shares; each stratum's
 * unobserved means are free of the others', so the sum is sharp when every stratum's interval
 * is.) If any stratum is refuted the study is refuted.
 *
 * <p>A stratum whose units all fall in one arm still has an interval: the missing arm's mean is
 * only known to lie in the outcome range {@code [a, b]}, which is Manski's (1990) worst-case
 * bound with treated share {@code p = 1} or {@code p = 0}:
 *
 * <pre>
 *   only treated units:   [ mu1 - b ,  mu1 - a ]
 *   only untreated units: [ a - mu0 ,  b - mu0 ]
 * </pre>
 *
 * It is used whatever the assumptions (valid under all of them, sharp only for
 * {@code worst-case}): with one arm missing, the assumptions that compare the arms have nothing
 * to compare. {@link #oneArmed} names such strata so callers can warn about them. While the
 * whole study lacks an arm its interval is insufficient data.
 */
public final class StratifiedBounds {

    private StratifiedBounds() {
    }

    /** The study interval and each stratum's own interval. */
    public record Result(IdentifiedInterval overall, Map<String, IdentifiedInterval> perStratum) {
        /** The strata in name order (kept sorted: reports copy and write them in that order, in linear time). */
        public Result {
            perStratum = Collections.unmodifiableSortedMap(new TreeMap<>(perStratum));
        }
    }

    public static Result interval(StudyCells study, OutcomeRange range, AssumptionSet assumptions) {
        Map<String, IdentifiedInterval> perStratum = new TreeMap<>();
        long total = study.pooled().total();
        double lower = 0;
        double upper = 0;
        boolean refuted = false;
        boolean insufficient = total == 0;
        for (Map.Entry<String, Map<String, ObservedArms>> e : study.byStratum().entrySet()) {
            Map<String, ObservedArms> levels = e.getValue();
            ObservedArms pooled = study.pooled(e.getKey());
            if (pooled.total() == 0) {
                continue; // a stratum with no units has weight zero
            }
            IdentifiedInterval interval = pooled.hasEmptyArm() && !study.pooled().hasEmptyArm() ? oneArmWorstCase(pooled, range, assumptions)
                    : levels.size() == 1 ? BoundCalculator.interval(levels.values().iterator().next(), range, assumptions)
                    : assumptions.instrument().interval(levels, range, assumptions);
            perStratum.put(e.getKey(), interval);
            switch (interval.status()) {
                case REFUTED -> refuted = true;
                case INSUFFICIENT_DATA -> insufficient = true;
                case BOUNDED -> {
                    double w = (double) pooled.total() / total;
                    lower += w * interval.lower();
                    upper += w * interval.upper();
                }
            }
        }
        IdentifiedInterval overall = refuted ? IdentifiedInterval.refuted()
                : insufficient ? IdentifiedInterval.insufficientData()
                : IdentifiedInterval.of(lower, upper);
        return new Result(overall, perStratum);
    }

    /** The strata that have units in only one arm, whose intervals are the worst case above. */
    public static List<String> oneArmed(StudyCells study) {
        if (study.pooled().hasEmptyArm()) {
            return List.of();
        }
        List<String> out = null; // asked for by every band: no list unless some stratum is one-armed
        for (String s : study.byStratum().keySet()) {
            ObservedArms pooled = study.pooled(s);
            if (pooled.total() > 0 && pooled.hasEmptyArm()) {
                if (out == null) {
                    out = new ArrayList<>();
                }
                out.add(s);
            }
        }
        return out == null ? List.of() : List.copyOf(out);
    }

    /**
     * Manski (1990) worst case with {@code p} equal to 1 (no untreated units) or 0 (no treated
     * units); with pending outcomes over the arm's {@link ArmMeanRange} (Horowitz &amp; Manski 2000).
     */
    private static IdentifiedInterval oneArmWorstCase(ObservedArms arms, OutcomeRange range, AssumptionSet assumptions) {
        if (arms.control().units() == 0) {
            ArmMeanRange mu1 = ArmMeanRange.of(arms.treated(), range, assumptions);
            return IdentifiedInterval.of(mu1.lowMean(range) - range.max(), mu1.highMean(range) - range.min());
        }
        ArmMeanRange mu0 = ArmMeanRange.of(arms.control(), range, assumptions);
        return IdentifiedInterval.of(range.min() - mu0.highMean(range), range.max() - mu0.lowMean(range));
    }
}
