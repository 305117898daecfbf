package dev.bracket.bands;

import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.IdentifiedInterval;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.bounds.StratifiedBounds;
import dev.bracket.bounds.StudyCells;

import java.util.ArrayList;
import java.util.Collections;
import java.util.EnumSet;
import java.util.List;
import java.util.Set;

/**
 * Which confidence bands to compute and how: the one entry point for reports, the stream's
 * bound updater and alerts.
 *
 * @param level        confidence level 1 - alpha, in (0, 1)
 * @param methods      the bands wanted (reported in {@link BandMethod} order)
 * @param variance     where the bands take the arms' spreads from
 * @param plannedCount tuning of the anytime band (see {@link AnytimeBand}); fix it before the data arrive
 */
public record BandConfig(double level, Set<BandMethod> methods, VarianceBasis variance, long plannedCount) {

    public static final double DEFAULT_LEVEL = 0.95;

    public BandConfig {
        if (!(level > 0 && level < 1)) {
            throw new IllegalArgumentException("level must lie strictly between 0 and 1, was " + level);
        }
        if (methods == null || variance == null) {
            throw new IllegalArgumentException("methods and variance basis are required");
        }
        if (plannedCount < 1) {
            throw new IllegalArgumentException("planned count must be >= 1, was " + plannedCount);
        }
        methods = methods.isEmpty() ? Set.of() : Collections.unmodifiableSet(EnumSet.copyOf(methods));
    }

    /** Both bands at the given level, sample variances, default anytime tuning. */
    public static BandConfig both(double level) {
        return new BandConfig(level, EnumSet.allOf(BandMethod.class), VarianceBasis.SAMPLE, AnytimeBand.DEFAULT_PLANNED_COUNT);
    }

    /** No bands: reports show identified intervals only. */
    public static BandConfig none() {
        return new BandConfig(DEFAULT_LEVEL, Set.of(), VarianceBasis.SAMPLE, AnytimeBand.DEFAULT_PLANNED_COUNT);
    }

    public BandConfig withVariance(VarianceBasis basis) {
        return new BandConfig(level, methods, basis, plannedCount);
    }

    /** The requested bands for one assumption set over a study's cells. */
    public List<ConfidenceBand> bands(StudyCells cells, OutcomeRange range, AssumptionSet assumptions) {
        return methods.isEmpty() ? List.of() : bands(cells, range, assumptions, StratifiedBounds.interval(cells, range, assumptions).overall());
    }

    /**
     * The same, given the study's estimated interval for these assumptions (computing it can take
     * linear programs, see {@link dev.bracket.bounds.IndependentInstrumentBounds}).
     */
    public List<ConfidenceBand> bands(StudyCells cells, OutcomeRange range, AssumptionSet assumptions, IdentifiedInterval estimate) {
        List<ConfidenceBand> out = new ArrayList<>(methods.size());
        for (BandMethod m : methods) {
            out.add(switch (m) {
                case FIXED_HORIZON -> FixedHorizonBand.of(cells, range, assumptions, level, variance, estimate);
                case ANYTIME -> AnytimeBand.shared(level, plannedCount, variance).of(cells, range, assumptions, estimate);
            });
        }
        return List.copyOf(out);
    }
}
