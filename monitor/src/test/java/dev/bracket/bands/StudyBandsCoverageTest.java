package dev.bracket.bands;

import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.IdentifiedInterval;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.bounds.StudyCells;
import org.apache.commons.math3.distribution.NormalDistribution;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

import java.util.ArrayList;
import java.util.EnumMap;
import java.util.EnumSet;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.SplittableRandom;
import java.util.function.BiFunction;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Coverage and width of both bands for studies with strata and instrument levels, by simulation
 * with known truth. Here every cell has the same fixed number of units, so the observed stratum
 * shares equal the population's (random shares are {@link StrataSharesCoverageTest}'s subject) and
 * the target is the share-weighted combination of the true stratum intervals; instrument levels
 * enter through Manski's (1990) intersection, which does not depend on the level shares.
 * Instrument studies use Bonferroni over cells, so their bands are expected to be conservative.
 * Bands are told apart by their {@link BandMethod}, not by their place in the list.
 *
 * <p>Coverage alone would pass an infinitely wide band, so each band's mean width is also checked
 * against a reference computed here from the true cell parameters, by code of its own (no call
 * into the bands; Commons Math only for normal quantiles):
 * <ul>
 *   <li>Fixed-horizon band, strata without levels: the Imbens &amp; Manski (2004, Econometrica
 *       72(6), §4) interval {@code [L - C se_L, U + C se_U]} at the true ends, with
 *       {@code C = z(1 - alpha)} (their critical value for an interval long against its noise,
 *       which the reference asserts) and standard errors of the true share-weighted ends. Each
 *       worst-case or MTR end is the mean of a binary per-unit quantity over the pooled
 *       population (the upper end {@code p mu1 + (1-p)(1-mu0)} is P(T Y + (1-T)(1-Y) = 1)), so by
 *       the law of total variance its variance, within-stratum noise plus the sampling of the
 *       shares, is {@code q (1 - q) / n} for the pooled probability q. Under MTR with MTS the upper
 *       end {@code sum w_s (mu1_s - mu0_s)} (Manski &amp; Pepper 2000) gets the variances of two
 *       independent arm means per stratum plus the shares' term {@code sum w_s (U_s - U)^2 / n}.</li>
 *   <li>Fixed-horizon band with instrument levels: the Bonferroni projection of normal boxes
 *       (radius {@code z sd / sqrt(count)}, {@code z = z(1 - alpha / (2 (3 K + S)))} for K cells
 *       and S stratum shares) through the closed-form bounds (Manski 1990, 1997; Manski &amp;
 *       Pepper 2000) over a grid of each box, intersected over levels and combined over strata
 *       with the shares free in their intervals.</li>
 *   <li>Anytime band: the same two constructions the band documents — one bound per end on the
 *       end's per-unit quantity where there is one (worst case, MTR), boxes otherwise — with the
 *       empirical-Bernstein boundary of Howard, Ramdas, McAuliffe &amp; Sekhon (2021, Ann. Statist.
 *       49(2), Thm 4) evaluated at each quantity's true variance instead of the observed one, with
 *       the band's documented mixture over lambda. This reference shares the band's design (error
 *       split, tuning), not its code: it checks that the band puts the right quantity, variance and
 *       error into the boundary and that nothing else widens or narrows it. The boundary's validity
 *       is {@code AnytimeValidityTest}'s subject, its gain over the range-based band
 *       {@code AnytimeWidthTest}'s.</li>
 * </ul>
 */
class StudyBandsCoverageTest {

    private static final OutcomeRange UNIT = new OutcomeRange(0, 1);
    private static final double LEVEL = 0.95;
    private static final double ALPHA = 1 - LEVEL;
    private static final NormalDistribution N01 = new NormalDistribution(0, 1);

    /**
     * Allowed gap between a band's mean width and its reference, as a share of the reference's
     * excess over the identified width (a choice, no source: the references are first-order —
     * true instead of estimated spreads, normal instead of Wilson intervals for shares, a grid over
     * each box — and the gaps seen are below 2%; a 20% error in a critical value moves the excess
     * by about 20%, four times this tolerance, while halving an anytime sequence's error moves it by
     * only about 1% and goes unnoticed here).
     */
    private static final double WIDTH_TOLERANCE = 0.05;

    /** Monte-Carlo standard errors of the mean width allowed on top (three: a correct band fails about three times in a thousand, normal approximation). */
    private static final double MC_ERRORS = 3;

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
    @DisplayName("strata without instrument: each band holds the ends of the identified set at the nominal level, at the reference width")
    void strataCoverage(String set) {
        coverage(STRATA, set, 2000, 1000, 11);
    }

    @ParameterizedTest(name = "strata x instrument levels, {0}")
    @ValueSource(strings = {"worst-case", "mtr-positive"})
    @DisplayName("strata with instrument levels: Bonferroni bands hold the identified set at the nominal level, at the reference width")
    void instrumentCoverage(String set) {
        coverage(STRATA_AND_LEVELS, set, 4000, 300, 12);
    }

    /** Coverage counts and width sums of one band method over the replications. */
    private static final class Tally {
        int lowerCovered;
        int upperCovered;
        double widthSum;
        double widthSquares;

        void add(ConfidenceBand band, IdentifiedInterval target) {
            lowerCovered += band.contains(target.lower()) ? 1 : 0;
            upperCovered += band.contains(target.upper()) ? 1 : 0;
            // A band that is not identified has no width; it counts as the widest possible.
            double w = band.isBounded() ? band.width() : 2 * UNIT.width();
            widthSum += w;
            widthSquares += w * w;
        }
    }

    private static void coverage(List<PopulationCell> population, String set, int n, int replications, long seed) {
        AssumptionSet assumptions = AssumptionSet.parse(set);
        BandConfig settings = BandConfig.both(LEVEL);
        SplittableRandom rng = new SplittableRandom(seed);
        IdentifiedInterval target = PopulationCell.interval(population, UNIT, assumptions);
        Map<BandMethod, Tally> tallies = new EnumMap<>(BandMethod.class);
        for (int r = 0; r < replications; r++) {
            StudyCells sample = sample(population, n, rng);
            for (ConfidenceBand band : settings.bands(sample, UNIT, assumptions)) {
                tallies.computeIfAbsent(band.method(), m -> new Tally()).add(band, target);
            }
        }
        assertEquals(EnumSet.allOf(BandMethod.class), tallies.keySet(), "one band of each method");
        double floor = LEVEL - 3 * Math.sqrt(LEVEL * (1 - LEVEL) / replications);
        for (Map.Entry<BandMethod, Tally> e : tallies.entrySet()) {
            BandMethod m = e.getKey();
            Tally t = e.getValue();
            double lower = (double) t.lowerCovered / replications;
            double upper = (double) t.upperCovered / replications;
            double width = t.widthSum / replications;
            double sd = Math.sqrt(Math.max(0, t.widthSquares / replications - width * width));
            double reference = reference(population, n, set, m, target.width());
            double tolerance = WIDTH_TOLERANCE * (reference - target.width()) + MC_ERRORS * sd / Math.sqrt(replications);
            System.out.printf(Locale.ROOT, "%-26s %-8s cells=%d n=%d coverage of lower end %.4f, upper end %.4f; "
                            + "mean width %.4f (MC se %.5f), reference %.4f, identified %.4f%n",
                    set, m.id(), population.size(), n, lower, upper, width, sd / Math.sqrt(replications), reference, target.width());
            assertTrue(lower >= floor && upper >= floor, set + " " + m.id() + ": coverage " + lower + ", " + upper + " below " + floor);
            assertEquals(reference, width, tolerance, set + " " + m.id() + ": mean width against the reference");
        }
    }

    /** The reference for the band's mean width, for {@code n} units in equal-sized cells. */
    private static double reference(List<PopulationCell> population, int n, String set, BandMethod method, double identified) {
        Map<String, List<PopulationCell>> strata = byStratum(population);
        boolean levels = strata.values().stream().anyMatch(l -> l.size() > 1);
        // Bonferroni over three quantities per cell and one share per stratum, each two-sided.
        double boxError = ALPHA / (2.0 * (3 * population.size() + strata.size()));
        if (method == BandMethod.FIXED_HORIZON) {
            return levels ? projectionWidth(strata, n, set, normal(boxError)) : imbensManskiWidth(population, n, set);
        }
        // The band's routing for these sets: a per-unit quantity per end exists for worst case and MTR
        // without levels, not once MTS bounds a counterfactual by the other arm's mean (and is refutable).
        boolean perEnd = !levels && !set.contains("mts");
        if (perEnd) {
            return identified + perEndExcess(population, n, set, mixture(ALPHA / 2));
        }
        if (!levels) {
            // MTR with MTS: each end on its own at alpha / 2 over boxes reaching out on one side; neither
            // end moves with p, so the error splits over one bound per arm mean and two per stratum share.
            // The lower end is 0 at every compatible point, so the two-sided projection's width is the same.
            return projectionWidth(strata, n, set, mixture(ALPHA / 2 / (2 * population.size() + 2 * strata.size())));
        }
        return projectionWidth(strata, n, set, mixture(boxError));
    }

    /** Two-sided normal radius at error {@code 2 oneSided}: {@code z(1 - oneSided) sd / sqrt(count)}. */
    private static BiFunction<Long, Double, Double> normal(double oneSided) {
        double z = N01.inverseCumulativeProbability(1 - oneSided);
        return (count, variance) -> z * Math.sqrt(variance / count);
    }

    /**
     * Imbens &amp; Manski (2004), §4, at the true share-weighted ends: width + C (se_L + se_U) with
     * C = z(1 - alpha), the value for an interval long against its standard errors (asserted,
     * with Stoye's pre-test threshold {@code sqrt(ln n)} as the bands apply it).
     */
    private static double imbensManskiWidth(List<PopulationCell> population, int n, String set) {
        int perCell = n / population.size();
        double w = 1.0 / population.size();
        double lower = 0;
        double upper = 0;
        double withinUpper = 0;
        List<Double> stratumUppers = new ArrayList<>();
        for (PopulationCell c : population) {
            if (set.equals("worst-case")) {
                lower -= w * lowerQuantityMean(c);
            }
            if (set.equals("mtr-positive,mts-positive")) {
                // Manski & Pepper (2000): [0, mu1 - mu0]; two independent arm means.
                double u = c.mu1() - c.mu0();
                upper += w * u;
                stratumUppers.add(u);
                withinUpper += w * w * (c.mu1() * (1 - c.mu1()) / (perCell * c.p()) + c.mu0() * (1 - c.mu0()) / (perCell * (1 - c.p())));
            } else {
                // Worst case and Manski (1997) MTR share the upper end; MTR puts the lower end at 0.
                upper += w * upperQuantityMean(c);
            }
        }
        double varLower = -lower * (1 + lower) / n;
        double varUpper;
        if (set.equals("mtr-positive,mts-positive")) {
            double shares = 0;
            for (double u : stratumUppers) {
                shares += w * (u - upper) * (u - upper) / n;
            }
            varUpper = withinUpper + shares;
        } else {
            varUpper = upper * (1 - upper) / n;
        }
        double seLower = Math.sqrt(varLower);
        double seUpper = Math.sqrt(varUpper);
        double width = upper - lower;
        assertTrue(width > Math.sqrt(Math.log(n)) * Math.max(seLower, seUpper), "the reference is for long intervals only");
        return width + N01.inverseCumulativeProbability(LEVEL) * (seLower + seUpper);
    }

    /** P(T (1 - Y) + (1 - T) Y = 1): minus the worst-case lower end of a cell. */
    private static double lowerQuantityMean(PopulationCell c) {
        return c.p() * (1 - c.mu1()) + (1 - c.p()) * c.mu0();
    }

    /** P(T Y + (1 - T)(1 - Y) = 1): the worst-case (and MTR) upper end of a cell. */
    private static double upperQuantityMean(PopulationCell c) {
        return c.p() * c.mu1() + (1 - c.p()) * (1 - c.mu0());
    }

    /**
     * What the per-end construction adds to the identified width, each end at error alpha / 2,
     * with the pooled binary quantities' true variances (the MTR lower end is the constant 0).
     */
    private static double perEndExcess(List<PopulationCell> population, int n, String set, BiFunction<Long, Double, Double> radius) {
        double qLower = population.stream().mapToDouble(StudyBandsCoverageTest::lowerQuantityMean).average().orElseThrow();
        double qUpper = population.stream().mapToDouble(StudyBandsCoverageTest::upperQuantityMean).average().orElseThrow();
        return (set.equals("worst-case") ? radius.apply((long) n, qLower * (1 - qLower)) : 0) + radius.apply((long) n, qUpper * (1 - qUpper));
    }

    /**
     * The one-sided empirical-Bernstein bound at error {@code oneSided} for {@code count}
     * observations in [0, 1] of the given variance (Howard et al. 2021, Thm 4, with Fan et al.'s
     * 2015 {@code psi(lambda) = -ln(1 - lambda) - lambda}), with the mixture the band documents:
     * {@code lambda_k = 2^(-1 - k/2)}, k = 0..47, weights proportional to {@code 1 / (1 + |k - k0|)^2}
     * around the k0 nearest {@code sqrt(32 ln(1/oneSided) / plannedCount)} (the best lambda for a law of variance 1/16). A mean at distance d is
     * rejected when {@code lambda d - psi (variance + d^2) >= ln(1 / (oneSided w_k)) / count} for some
     * k; the bound is the smallest such d over k, here with the true variance where the band has
     * the observed one (the plain search of {@code EmpiricalBernsteinBoundaryTest}, with M2 = count
     * times the variance, on the unit scale).
     */
    private static BiFunction<Long, Double, Double> mixture(double oneSided) {
        return (count, variance) -> EmpiricalBernsteinBoundaryTest.plainSearch(oneSided, AnytimeBand.DEFAULT_PLANNED_COUNT,
                count, variance * count, 1, 1);
    }

    /**
     * The band the cells' boxes {@code p +- r_p, mu1 +- r_1, mu0 +- r_0} (clipped to [0, 1])
     * project to, from each level's closed-form bounds on E[Y1] and E[Y0] (Manski 1990 for worst
     * case, Manski 1997 for MTR, Manski &amp; Pepper 2000 for MTR with MTS) at the points of a grid
     * over its box, skipping points where the assumptions are refuted. A stratum with one level
     * gets the smallest lower and largest upper ATE end over its box; with instrument levels each
     * bound is extremised over its level's box and then intersected over levels (Manski 1990, mean
     * independence): {@code [max_z min L1_z - min_z max U0_z, min_z max U1_z - max_z min L0_z]}.
     * Two equal strata with shares in {@code 1/2 +- r_w} (share variance 1/4): the lowest weighted lower end is
     * {@code (L_a + L_b) / 2 - r_w |L_a - L_b|}, the highest upper end likewise.
     *
     * @param radius the radius for a quantity (box coordinate or stratum share) estimated from
     *               {@code count} units with the given variance
     */
    private static double projectionWidth(Map<String, List<PopulationCell>> strata, int n, String set,
                                          BiFunction<Long, Double, Double> radius) {
        assertEquals(2, strata.size(), "the share step below is for two equal strata");
        int perCell = n / strata.values().stream().mapToInt(List::size).sum();
        List<double[]> ends = new ArrayList<>(); // {lower, upper} per stratum
        for (List<PopulationCell> cells : strata.values()) {
            List<double[]> levels = new ArrayList<>();
            for (PopulationCell c : cells) {
                levels.add(levelRanges(c, perCell, set, radius));
            }
            if (levels.size() == 1) {
                ends.add(new double[] {levels.get(0)[0], levels.get(0)[1]});
            } else {
                double l1 = levels.stream().mapToDouble(l -> l[2]).max().orElseThrow();
                double u1 = levels.stream().mapToDouble(l -> l[3]).min().orElseThrow();
                double l0 = levels.stream().mapToDouble(l -> l[4]).max().orElseThrow();
                double u0 = levels.stream().mapToDouble(l -> l[5]).min().orElseThrow();
                ends.add(new double[] {l1 - u0, u1 - l0});
            }
        }
        double rw = radius.apply((long) n, 0.25);
        double[] a = ends.get(0);
        double[] b = ends.get(1);
        double lower = (a[0] + b[0]) / 2 - rw * Math.abs(a[0] - b[0]);
        double upper = (a[1] + b[1]) / 2 + rw * Math.abs(a[1] - b[1]);
        return upper - lower;
    }

    /** {ATE lower, ATE upper, min E[Y1] low, max E[Y1] high, min E[Y0] low, max E[Y0] high} over one cell's box. */
    private static double[] levelRanges(PopulationCell c, int perCell, String set, BiFunction<Long, Double, Double> radius) {
        long treated = Math.round(perCell * c.p());
        double rp = radius.apply((long) perCell, c.p() * (1 - c.p()));
        double r1 = radius.apply(treated, c.mu1() * (1 - c.mu1()));
        double r0 = radius.apply(perCell - treated, c.mu0() * (1 - c.mu0()));
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
        return level;
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

    private static Map<String, List<PopulationCell>> byStratum(List<PopulationCell> population) {
        Map<String, List<PopulationCell>> strata = new LinkedHashMap<>();
        for (PopulationCell c : population) {
            strata.computeIfAbsent(c.stratum(), x -> new ArrayList<>()).add(c);
        }
        return strata;
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
