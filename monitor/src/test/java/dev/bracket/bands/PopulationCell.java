package dev.bracket.bands;

import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.IdentifiedInterval;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.bounds.StratifiedBounds;
import dev.bracket.bounds.StudyCells;

import java.util.List;

/**
 * A cell of a simulated population with binary outcomes, for simulations with known truth:
 * stratum, instrument level, P(T = 1), E[Y | T = 1], E[Y | T = 0]. Every cell of a population is
 * equally large.
 */
record PopulationCell(String stratum, String level, double p, double mu1, double mu0) {

    /**
     * The population's identified interval: the engine applied to the true cell parameters (equal
     * cell sizes, counts in the exact ratio p : 1 - p, exact means), so strata carry their
     * population shares.
     */
    static IdentifiedInterval interval(List<PopulationCell> population, OutcomeRange range, AssumptionSet assumptions) {
        long scale = 1_000_000_000L;
        StudyCells truth = StudyCells.empty();
        for (PopulationCell c : population) {
            long treated = Math.round(c.p() * scale);
            truth = truth.with(c.stratum(), c.level(), new ObservedArms(
                    ArmStatistics.ofSummary(treated, c.mu1(), 0), ArmStatistics.ofSummary(scale - treated, c.mu0(), 0)));
        }
        return StratifiedBounds.interval(truth, range, assumptions).overall();
    }
}
