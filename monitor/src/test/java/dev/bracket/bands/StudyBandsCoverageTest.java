package dev.bracket.bands;

import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.IdentifiedInterval;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.bounds.StudyCells;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

import java.util.List;
import java.util.Locale;
import java.util.SplittableRandom;

import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Coverage of both bands for studies with strata and instrument levels, by simulation with known
 * truth. Here every cell has the same fixed number of units, so the observed stratum shares equal
 * the population's (random shares are {@link StrataSharesCoverageTest}'s subject) and the target
 * is the share-weighted combination of the true stratum intervals; instrument levels enter through Manski's (1990)
 * intersection, which does not depend on the level shares. Instrument studies use Bonferroni
 * over cells, so their bands are expected to be conservative.
 */
class StudyBandsCoverageTest {

    private static final OutcomeRange UNIT = new OutcomeRange(0, 1);
    private static final double LEVEL = 0.95;

    private static final List<PopulationCell> STRATA = List.of(
            new PopulationCell("north", StudyCells.NONE, 0.3, 0.6, 0.4),
            new PopulationCell("south", StudyCells.NONE, 0.6, 0.7, 0.55));

    private static final List<PopulationCell> STRATA_AND_LEVELS = List.of(
            new PopulationCell("north", "0", 0.2, 0.6, 0.4),
            new PopulationCell("north", "1", 0.7, 0.65, 0.45),
            new PopulationCell("south", "0", 0.4, 0.7, 0.5),
            new PopulationCell("south", "1", 0.8, 0.75, 0.5));

    @ParameterizedTest(name = "strata, {0}")
    @ValueSource(strings = {"worst-case", "mtr-positive", "mtr-positive,mts-positive"})
    @DisplayName("strata without instrument: each band holds the ends of the identified set at the nominal level")
    void strataCoverage(String set) {
        coverage(STRATA, AssumptionSet.parse(set), 2000, 1000, 11);
    }

    @ParameterizedTest(name = "strata x instrument levels, {0}")
    @ValueSource(strings = {"worst-case", "mtr-positive"})
    @DisplayName("strata with instrument levels: Bonferroni bands hold the identified set at the nominal level")
    void instrumentCoverage(String set) {
        coverage(STRATA_AND_LEVELS, AssumptionSet.parse(set), 4000, 300, 12);
    }

    private static void coverage(List<PopulationCell> population, AssumptionSet assumptions, int n, int replications, long seed) {
        BandConfig settings = BandConfig.both(LEVEL);
        SplittableRandom rng = new SplittableRandom(seed);
        int[] lowerCovered = new int[2];
        int[] upperCovered = new int[2];
        IdentifiedInterval target = PopulationCell.interval(population, UNIT, assumptions);
        for (int r = 0; r < replications; r++) {
            StudyCells sample = sample(population, n, rng);
            List<ConfidenceBand> bands = settings.bands(sample, UNIT, assumptions);
            for (int b = 0; b < 2; b++) {
                lowerCovered[b] += bands.get(b).contains(target.lower()) ? 1 : 0;
                upperCovered[b] += bands.get(b).contains(target.upper()) ? 1 : 0;
            }
        }
        double floor = LEVEL - 3 * Math.sqrt(LEVEL * (1 - LEVEL) / replications);
        for (int b = 0; b < 2; b++) {
            double lower = (double) lowerCovered[b] / replications;
            double upper = (double) upperCovered[b] / replications;
            System.out.printf(Locale.ROOT, "%-26s %-13s cells=%d n=%d coverage of lower end %.4f, upper end %.4f%n",
                    assumptions, List.of(BandMethod.values()).get(b).id(), population.size(), n, lower, upper);
            assertTrue(lower >= floor && upper >= floor, "coverage " + lower + ", " + upper + " below " + floor);
        }
    }

    /** Equal-sized cells; within a cell treatment with probability p, then a binary outcome. */
    private static StudyCells sample(List<PopulationCell> population, int n, SplittableRandom rng) {
        StudyCells cells = StudyCells.empty();
        for (PopulationCell c : population) {
            ObservedArms arms = ObservedArms.empty();
            for (int i = 0; i < n / population.size(); i++) {
                boolean treated = rng.nextDouble() < c.p();
                arms = arms.add(treated, rng.nextDouble() < (treated ? c.mu1() : c.mu0()) ? 1 : 0);
            }
            cells = cells.with(c.stratum(), c.level(), arms);
        }
        return cells;
    }
}
