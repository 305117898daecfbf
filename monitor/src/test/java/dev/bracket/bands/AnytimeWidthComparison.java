package dev.bracket.bands;

import dev.bracket.bounds.ObservablesBox;
import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.BoundCalculator;
import dev.bracket.bounds.IdentifiedInterval;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeRange;
import org.apache.commons.math3.random.RandomGenerator;
import org.apache.commons.math3.random.Well19937c;

import java.util.List;
import java.util.Locale;

/**
 * Excess width (band width minus identified width) of the anytime band against the range-based
 * band it replaced, on the same simulated data: three normal-mixture sequences (Howard et al.
 * 2021, §3) per cell at {@code alpha / 3} each, for the treated share and the two arm means on
 * outcomes rescaled by the range, projected as a box ({@link BoxProjection}). Run {@link #main}
 * for the table; {@code AnytimeWidthTest} asserts the targets on the same figures.
 */
final class AnytimeWidthComparison {

    static final OutcomeRange UNIT = new OutcomeRange(0, 1);
    static final double LEVEL = 0.95;
    static final double P = 0.3;
    static final long[] SIZES = {1_000, 10_000, 100_000};
    static final int REPLICATIONS = 10;
    /** The assumption sets compared: single assumptions of every kind of end, and a refutable combination. */
    static final List<String> SETS = List.of("worst-case", "mtr-positive", "optimizing-selection", "mts-positive",
            "mts-negative", "mtr-positive,mts-positive", "sorting-on-gains");

    /** A pair of outcome laws for the two arms. */
    record Scenario(String name, OutcomeLaw treated, OutcomeLaw control) {
    }

    /** Spread: Beta laws with sd about 0.28 of the range; concentrated: sd about 0.05 of the range. */
    static final Scenario SPREAD = new Scenario("spread", OutcomeLaw.beta(1.2, 0.8), OutcomeLaw.beta(0.9, 1.1));
    static final Scenario CONCENTRATED = new Scenario("concentrated", OutcomeLaw.beta(59.4, 39.6), OutcomeLaw.beta(44.55, 54.45));

    /** Mean excess width {before, after} at each of {@link #SIZES}, over {@link #REPLICATIONS} streams. */
    static double[][] excess(Scenario scenario, AssumptionSet assumptions) {
        IdentifiedInterval truth = BoundCalculator.interval(P, scenario.treated().mean(), scenario.control().mean(), UNIT, assumptions);
        AnytimeBand after = new AnytimeBand(LEVEL);
        NormalMixtureBoundary before = NormalMixtureBoundary.tunedFor((1 - LEVEL) / 3, AnytimeBand.DEFAULT_PLANNED_COUNT);
        double[][] out = new double[SIZES.length][2];
        for (int r = 0; r < REPLICATIONS; r++) {
            RandomGenerator rng = new Well19937c(2021_49_2L + r);
            ObservedArms arms = ObservedArms.empty();
            long n = 0;
            for (int i = 0; i < SIZES.length; i++) {
                arms = arms.merge(Simulation.sample(rng, (int) (SIZES[i] - n), P, scenario.treated(), scenario.control()));
                n = SIZES[i];
                ConfidenceBand old = BoxProjection.cell(rangeBox(arms, before), UNIT, assumptions)
                        .map(e -> ConfidenceBand.of(BandMethod.ANYTIME, LEVEL, e.lower(), e.upper(), "before"))
                        .orElseThrow();
                out[i][0] += (old.width() - truth.width()) / REPLICATIONS;
                out[i][1] += (after.ofCell(arms, UNIT, assumptions).width() - truth.width()) / REPLICATIONS;
            }
        }
        return out;
    }

    /**
     * Excess width at each of {@link #SIZES} of an ideal variance-adaptive version of the replaced
     * band, for sets whose ends are means of per-unit quantities: the replaced band's
     * normal-mixture boundary at {@code alpha / 2} per end, scaled by each end quantity's true
     * standard deviation (from the laws: {@code Var(T g1(Y) + (1 - T) g0(Y))}) instead of the
     * range bound 1/2. No band of that boundary shape can beat it without knowing more than the
     * spread; it shows how much of a target variance adaptation alone can reach.
     */
    static double[] knownSpread(Scenario scenario, AssumptionSet assumptions) {
        NormalMixtureBoundary boundary = NormalMixtureBoundary.tunedFor((1 - LEVEL) / 2, AnytimeBand.DEFAULT_PLANNED_COUNT);
        double sd = sd(scenario, EndQuantities.end(UNIT, assumptions, false).orElseThrow())
                + sd(scenario, EndQuantities.end(UNIT, assumptions, true).orElseThrow());
        double[] out = new double[SIZES.length];
        for (int i = 0; i < SIZES.length; i++) {
            out[i] = boundary.radius(SIZES[i]) * sd / Math.sqrt(NormalMixtureBoundary.UNIT_VARIANCE_PROXY);
        }
        return out;
    }

    private static double sd(Scenario s, EndQuantities.PerUnit q) {
        double t1 = q.treated().at(s.treated().mean());
        double t0 = q.control().at(s.control().mean());
        double second = P * (t1 * t1 + q.treated().slope() * q.treated().slope() * s.treated().variance())
                + (1 - P) * (t0 * t0 + q.control().slope() * q.control().slope() * s.control().variance());
        double mean = P * t1 + (1 - P) * t0;
        return Math.sqrt(second - mean * mean);
    }

    /** The box of the replaced band: normal-mixture radii on the rescaled arms. */
    private static ObservablesBox rangeBox(ObservedArms arms, NormalMixtureBoundary boundary) {
        ArmStatistics t = arms.treated();
        ArmStatistics c = arms.control();
        return ObservablesBox.around(arms.treatedShare(), boundary.radius(arms.total()),
                t.mean(), UNIT.width() * boundary.radius(t.count()), c.mean(), UNIT.width() * boundary.radius(c.count()), UNIT);
    }

    public static void main(String[] args) {
        System.out.println("excess width of the anytime 95% band (band width - identified width), mean of "
                + REPLICATIONS + " streams, treated share " + P + "; 'known spread': the replaced band's boundary"
                + " with each end quantity's true spread (see knownSpread), where the ends have per-unit quantities");
        System.out.printf(Locale.ROOT, "%-13s %-26s %8s %10s %10s %8s %14s%n", "outcomes", "assumptions", "n", "before", "after", "less",
                "known spread");
        for (Scenario s : List.of(SPREAD, CONCENTRATED)) {
            for (String set : SETS) {
                AssumptionSet assumptions = AssumptionSet.parse(set);
                double[][] e = excess(s, assumptions);
                double[] ideal = EndQuantities.of(UNIT, assumptions).isPresent() ? knownSpread(s, assumptions) : null;
                for (int i = 0; i < SIZES.length; i++) {
                    System.out.printf(Locale.ROOT, "%-13s %-26s %8d %10.4f %10.4f %7.0f%% %14s%n",
                            s.name(), set, SIZES[i], e[i][0], e[i][1], 100 * (1 - e[i][1] / e[i][0]),
                            ideal == null ? "-" : String.format(Locale.ROOT, "%.4f (%.0f%%)", ideal[i], 100 * (1 - ideal[i] / e[i][0])));
                }
            }
        }
    }
}
