package dev.bracket.bounds;

import java.util.Collections;
import java.util.LinkedHashMap;
import java.util.Map;

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
 * is.) If any stratum is refuted the study is refuted; if any lacks data the overall interval is
 * insufficient data, since a missing stratum's contribution cannot be bounded without it.
 */
public final class StratifiedBounds {

    private StratifiedBounds() {
    }

    /** The study interval and each stratum's own interval. */
    public record Result(IdentifiedInterval overall, Map<String, IdentifiedInterval> perStratum) {
        public Result {
            perStratum = Collections.unmodifiableMap(new LinkedHashMap<>(perStratum));
        }
    }

    public static Result interval(StudyCells study, OutcomeRange range, AssumptionSet assumptions) {
        Map<String, IdentifiedInterval> perStratum = new LinkedHashMap<>();
        long total = study.pooled().total();
        double lower = 0;
        double upper = 0;
        boolean refuted = false;
        boolean insufficient = total == 0;
        for (Map.Entry<String, Map<String, ObservedArms>> e : study.byStratum().entrySet()) {
            Map<String, ObservedArms> levels = e.getValue();
            if (study.pooled(e.getKey()).total() == 0) {
                continue; // a stratum with no units has weight zero
            }
            IdentifiedInterval interval = levels.size() == 1
                    ? BoundCalculator.interval(levels.values().iterator().next(), range, assumptions)
                    : assumptions.instrument().interval(levels, range, assumptions);
            perStratum.put(e.getKey(), interval);
            switch (interval.status()) {
                case REFUTED -> refuted = true;
                case INSUFFICIENT_DATA -> insufficient = true;
                case BOUNDED -> {
                    double w = (double) study.pooled(e.getKey()).total() / total;
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
}
