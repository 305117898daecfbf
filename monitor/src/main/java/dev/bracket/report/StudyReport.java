package dev.bracket.report;

import dev.bracket.bands.BandConfig;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.bounds.StratifiedBounds;
import dev.bracket.bounds.StudyCells;

import java.util.List;
import java.util.Map;

/**
 * The bounds of one study for a list of assumption sets, with the pooled arms that produced
 * them. Built by {@link #of}; rendered by {@link dev.bracket.report.render.ReportJson} and {@link dev.bracket.report.render.ReportTable}.
 */
public record StudyReport(OutcomeRange range, ObservedArms pooled, StudyCells cells, List<BoundRow> rows) {

    public StudyReport {
        rows = List.copyOf(rows);
    }

    /** Computes every assumption set's interval over the study's cells, without confidence bands. */
    public static StudyReport of(StudyCells cells, OutcomeRange range, List<AssumptionSet> sets) {
        return of(cells, range, sets, BandConfig.none());
    }

    /** Computes every assumption set's interval and the requested confidence bands around it. */
    public static StudyReport of(StudyCells cells, OutcomeRange range, List<AssumptionSet> sets, BandConfig bands) {
        List<BoundRow> rows = sets.stream().map(set -> {
            StratifiedBounds.Result r = StratifiedBounds.interval(cells, range, set);
            Map<String, ?> strata = r.perStratum();
            boolean stratified = strata.size() > 1 || !strata.containsKey(StudyCells.NONE);
            return new BoundRow(set, r.overall(), stratified ? r.perStratum() : Map.of(), bands.bands(cells, range, set, r.overall()));
        }).toList();
        return new StudyReport(range, cells.pooled(), cells, rows);
    }
}
