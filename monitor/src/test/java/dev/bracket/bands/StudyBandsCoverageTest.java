package dev.bracket.bands;

import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.IdentifiedInterval;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.bounds.StratifiedBounds;
import dev.bracket.bounds.StudyCells;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;
import org.apache.commons.math3.distribution.NormalDistribution;

import java.util.ArrayList;
import java.util.EnumMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.SplittableRandom;
import java.util.TreeMap;
import java.util.function.BiFunction;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Coverage of both bands for studies with strata and instrument levels, by simulation with known
 * truth. Strata are weighted by their observed shares (as {@link StratifiedBounds} does), so the
 * target in each replication is the share-weighted combination of the true stratum intervals at
 * the replication's own stratum counts; instrument levels enter through Manski's (1990)
 * intersection, which does not depend on the level shares. Instrument studies use Bonferroni
 * over cells, so their bands are expected to be conservative.
 *
 * <p>Coverage alone would pass an infinitely wide band, so the mean width of each band is also
 * checked against a reference computed here from the true cell parameters, independently of the
 * bands' code: for the fixed-horizon band of strata, the Imbens &amp; Manski (2004, Econometrica
 * 72(6), §4) interval {@code [L - C se_L, U + C se_U]} with standard errors of the true ends (each
 * worst-case end is the mean of a binary per-unit variable, e.g. the upper end
 * {@code p mu1 + (1-p)(1-mu0)} is P(T Y + (1-T)(1-Y) = 1)); for the other bands, the closed-form
 * bounds (Manski 1990, 1997; Manski &amp; Pepper 2000) over a grid of each cell's confidence box,
 * combined over instrument levels and strata, with the box radii of the band's
 * construction (normal quantiles at Bonferroni level, or the normal-mixture boundary of Howard
 * et al. 2021).
 */
class StudyBandsCoverageTest {

    private static final OutcomeRange UNIT = new OutcomeRange(0, 1);
    private static final double LEVEL = 0.95;
    /**
     * Allowed gap between a band's mean width and its reference, as a share of what the band adds
     * to the identified set's width (a choice: the references are first-order, the gaps seen are
     * below 2%).
     */
    private static final double WIDTH_TOLERANCE = 0.05;

    /** A cell of the simulated population: stratum, level, P(T = 1), E[Y | T = 1], E[Y | T = 0] (binary outcomes). */
    private record Cell(String stratum, String level, double p, double mu1, double mu0) {
    }

    private static final List<Cell> STRATA = List.of(
            new Cell("north", StudyCells.NONE, 0.3, 0.6, 0.4),
            new Cell("south", StudyCells.NONE, 0.6, 0.7, 0.55));

    private static final List<Cell> STRATA_AND_LEVELS = List.of(
            new Cell("north", "0", 0.2, 0.6, 0.4),
            new Cell("north", "1", 0.7, 0.65, 0.45),
            new Cell("south", "0", 0.4, 0.7, 0.5),
            new Cell("south", "1", 0.8, 0.75, 0.5));

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

    private static void coverage(List<Cell> population, AssumptionSet assumptions, int n, int replications, long seed) {
        BandSettings settings = BandSettings.both(LEVEL);
        SplittableRandom rng = new SplittableRandom(seed);
        Map<BandMethod, int[]> lowerCovered = new EnumMap<>(BandMethod.class);
        Map<BandMethod, int[]> upperCovered = new EnumMap<>(BandMethod.class);
        Map<BandMethod, double[]> widthSum = new EnumMap<>(BandMethod.class);
        double targetWidthSum = 0;
        for (BandMethod m : BandMethod.values()) {
            lowerCovered.put(m, new int[1]);
            upperCovered.put(m, new int[1]);
            widthSum.put(m, new double[1]);
        }
        for (int r = 0; r < replications; r++) {
            StudyCells sample = sample(population, n, rng);
            IdentifiedInterval target = target(population, sample, assumptions);
            targetWidthSum += target.width();
            for (ConfidenceBand band : settings.bands(sample, UNIT, assumptions)) {
                lowerCovered.get(band.method())[0] += band.contains(target.lower()) ? 1 : 0;
                upperCovered.get(band.method())[0] += band.contains(target.upper()) ? 1 : 0;
                // A band that is not identified has no width; it counts as the widest possible.
                widthSum.get(band.method())[0] += band.isBounded() ? band.width() : 2 * UNIT.width();
            }
        }
        double floor = LEVEL - 3 * Math.sqrt(LEVEL * (1 - LEVEL) / replications);
        String set = assumptions.toString();
        double identifiedWidth = targetWidthSum / replications;
        for (BandMethod m : BandMethod.values()) {
            double lower = (double) lowerCovered.get(m)[0] / replications;
            double upper = (double) upperCovered.get(m)[0] / replications;
            double width = widthSum.get(m)[0] / replications;
            double reference = referenceWidth(population, n, set, m);
            System.out.printf(Locale.ROOT, "%-26s %-13s cells=%d n=%d coverage of lower end %.4f, upper end %.4f; "
                    + "mean width %.4f, reference %.4f, identified %.4f%n", set, m.id(), population.size(), n, lower, upper, width,
                    reference, identifiedWidth);
            assertTrue(lower >= floor && upper >= floor, set + " " + m.id() + ": coverage " + lower + ", " + upper + " below " + floor);
            assertEquals(reference, width, WIDTH_TOLERANCE * (reference - identifiedWidth),
                    set + " " + m.id() + ": mean width against the reference");
        }
    }

    /** The expected width of a band at the true parameters, for {@code n} units in equal-sized cells. */
    private static double referenceWidth(List<Cell> population, int n, String set, BandMethod method) {
        int perCell = n / population.size();
        boolean levels = population.stream().anyMatch(c -> !c.level().equals(StudyCells.NONE));
        if (method == BandMethod.FIXED_HORIZON && !levels) {
            return imbensManskiWidth(population, perCell, n, set);
        }
        int k = population.size();
        BiFunction<Long, Double, Double> radius;
        if (method == BandMethod.ANYTIME) {
            NormalMixtureBoundary boundary = NormalMixtureBoundary.tunedFor((1 - LEVEL) / (3.0 * k), AnytimeBand.DEFAULT_PLANNED_COUNT);
            radius = (count, variance) -> boundary.radius(count);
        } else {
            double z = new NormalDistribution(0, 1).inverseCumulativeProbability(1 - (1 - LEVEL) / (6.0 * k));
            radius = (count, variance) -> z * Math.sqrt(variance / count);
        }
        return projectionWidth(population, perCell, set, radius);
    }

    /**
     * Imbens &amp; Manski (2004), §4, at the true ends of the share-weighted strata, with Stoye's
     * pre-test as {@link ImbensManski} applies it; C from {@link ImbensManski#criticalValue},
     * itself checked against the paper's equation in {@code ImbensManskiTest}.
     */
    private static double imbensManskiWidth(List<Cell> population, int perCell, int n, String set) {
        double w = 1.0 / population.size();
        double lower = 0;
        double upper = 0;
        double varLower = 0;
        double varUpper = 0;
        for (Cell c : population) {
            // Worst-case ends as means of binary per-unit variables: lower = -P(T(1-Y) + (1-T)Y = 1).
            double lowerShare = c.p() * (1 - c.mu1()) + (1 - c.p()) * c.mu0();
            double upperShare = c.p() * c.mu1() + (1 - c.p()) * (1 - c.mu0());
            if (set.equals("worst-case")) {
                lower -= w * lowerShare;
                varLower += w * w * lowerShare * (1 - lowerShare) / perCell;
            }
            if (set.equals("mtr-positive,mts-positive")) {
                // Manski & Pepper (2000): [0, mu1 - mu0]; the difference of two independent arm means.
                upper += w * (c.mu1() - c.mu0());
                varUpper += w * w * (c.mu1() * (1 - c.mu1()) / (perCell * c.p()) + c.mu0() * (1 - c.mu0()) / (perCell * (1 - c.p())));
            } else {
                // Worst case and Manski (1997) MTR share the upper end; MTR puts the lower end at 0.
                upper += w * upperShare;
                varUpper += w * w * upperShare * (1 - upperShare) / perCell;
            }
        }
        double seLower = Math.sqrt(varLower);
        double seUpper = Math.sqrt(varUpper);
        double se = Math.max(seLower, seUpper);
        double width = upper - lower;
        double c = ImbensManski.criticalValue(LEVEL, width > Math.sqrt(Math.log(n)) * se ? width / se : 0);
        return width + c * (seLower + seUpper);
    }

    /**
     * The band the cells' confidence boxes {@code p +- r_p, mu1 +- r_1, mu0 +- r_0} (clipped to
     * [0, 1]) project to, from each level's closed-form bounds on E[Y1] and E[Y0] (Manski 1990 for
     * worst case, Manski 1997 for MTR, Manski &amp; Pepper 2000 for MTR with MTS) at the points of a
     * grid over its box, skipping points where the assumptions are refuted. A stratum with one
     * level gets the smallest lower and largest upper ATE end over its box; with instrument
     * levels, as the band's construction documents it (a valid, not the tightest, projection),
     * each bound is extremised over its level's box and then intersected over levels (Manski
     * 1990, mean independence): {@code [max_z min L1_z - min_z max U0_z, min_z max U1_z - max_z min L0_z]}.
     * The strata's share-weighted sum follows.
     *
     * @param radius the box radius for a quantity estimated from {@code count} units with the given variance
     */
    private static double projectionWidth(List<Cell> population, int perCell, String set, BiFunction<Long, Double, Double> radius) {
        Map<String, List<double[]>> strata = new TreeMap<>();
        for (Cell c : population) {
            long treated = Math.round(perCell * c.p());
            double rp = radius.apply((long) perCell, c.p() * (1 - c.p()));
            double r1 = radius.apply(treated, c.mu1() * (1 - c.mu1()));
            double r0 = radius.apply(perCell - treated, c.mu0() * (1 - c.mu0()));
            // {ATE lower, ATE upper, min E[Y1] low, max E[Y1] high, min E[Y0] low, max E[Y0] high} over the box
            double[] level = {Double.POSITIVE_INFINITY, Double.NEGATIVE_INFINITY,
                    Double.POSITIVE_INFINITY, Double.NEGATIVE_INFINITY, Double.POSITIVE_INFINITY, Double.NEGATIVE_INFINITY};
            for (double u : GRID) {
                for (double v : GRID) {
                    for (double t : GRID) {
                        double[] m = potentialOutcomeMeans(set, clip(c.p() + u * rp), clip(c.mu1() + v * r1), clip(c.mu0() + t * r0));
                        if (m != null) {
                            level[0] = Math.min(level[0], m[0] - m[3]);
                            level[1] = Math.max(level[1], m[1] - m[2]);
                            level[2] = Math.min(level[2], m[0]);
                            level[3] = Math.max(level[3], m[1]);
                            level[4] = Math.min(level[4], m[2]);
                            level[5] = Math.max(level[5], m[3]);
                        }
                    }
                }
            }
            strata.computeIfAbsent(c.stratum(), s -> new ArrayList<>()).add(level);
        }
        double width = 0;
        for (List<double[]> levels : strata.values()) {
            double stratumWidth;
            if (levels.size() == 1) {
                stratumWidth = levels.get(0)[1] - levels.get(0)[0];
            } else {
                double l1 = levels.stream().mapToDouble(l -> l[2]).max().orElseThrow();
                double u1 = levels.stream().mapToDouble(l -> l[3]).min().orElseThrow();
                double l0 = levels.stream().mapToDouble(l -> l[4]).max().orElseThrow();
                double u0 = levels.stream().mapToDouble(l -> l[5]).min().orElseThrow();
                stratumWidth = (u1 - l0) - (l1 - u0);
            }
            width += (double) levels.size() / population.size() * stratumWidth;
        }
        return width;
    }

    /** Points of each box coordinate, in units of its radius. */
    private static final double[] GRID = {-1, -0.5, 0, 0.5, 1};

    /** {E[Y1] low, E[Y1] high, E[Y0] low, E[Y0] high} of one level on [0, 1]; null when the assumptions are refuted. */
    private static double[] potentialOutcomeMeans(String set, double p, double mu1, double mu0) {
        double q = 1 - p;
        double observed = p * mu1 + q * mu0;
        return switch (set) {
            case "worst-case" -> new double[] {p * mu1, p * mu1 + q, q * mu0, q * mu0 + p};
            case "mtr-positive" -> new double[] {observed, p * mu1 + q, q * mu0, q * mu0 + p * mu1};
            case "mtr-positive,mts-positive" -> mu1 < mu0 ? null : new double[] {observed, mu1, mu0, observed};
            default -> throw new IllegalArgumentException("no reference for " + set);
        };
    }

    private static double clip(double x) {
        return Math.max(0, Math.min(1, x));
    }

    /** Equal-sized cells; within a cell treatment with probability p, then a binary outcome. */
    private static StudyCells sample(List<Cell> population, int n, SplittableRandom rng) {
        StudyCells cells = StudyCells.empty();
        for (Cell c : population) {
            ObservedArms arms = ObservedArms.empty();
            for (int i = 0; i < n / population.size(); i++) {
                boolean treated = rng.nextDouble() < c.p();
                arms = arms.add(treated, rng.nextDouble() < (treated ? c.mu1() : c.mu0()) ? 1 : 0);
            }
            cells = cells.with(c.stratum(), c.level(), arms);
        }
        return cells;
    }

    /**
     * The true identified set with the sample's stratum weights: the engine applied to the true
     * cell parameters (counts in the exact ratio p : 1 - p, exact means), then stratum intervals
     * weighted by the sample's stratum counts.
     */
    private static IdentifiedInterval target(List<Cell> population, StudyCells sample, AssumptionSet assumptions) {
        long scale = 1_000_000_000L;
        StudyCells truth = StudyCells.empty();
        for (Cell c : population) {
            long treated = Math.round(c.p() * scale);
            truth = truth.with(c.stratum(), c.level(), new ObservedArms(
                    ArmStatistics.ofSummary(treated, c.mu1(), 0), ArmStatistics.ofSummary(scale - treated, c.mu0(), 0)));
        }
        Map<String, IdentifiedInterval> perStratum = new TreeMap<>(StratifiedBounds.interval(truth, UNIT, assumptions).perStratum());
        double lower = 0;
        double upper = 0;
        for (Map.Entry<String, IdentifiedInterval> e : perStratum.entrySet()) {
            double w = (double) sample.pooled(e.getKey()).total() / sample.pooled().total();
            lower += w * e.getValue().lower();
            upper += w * e.getValue().upper();
        }
        return IdentifiedInterval.of(lower, upper);
    }
}
