package dev.bracket.bounds;

import net.jqwik.api.Arbitraries;
import net.jqwik.api.Arbitrary;
import net.jqwik.api.Combinators;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import net.jqwik.api.Provide;
import net.jqwik.api.statistics.Statistics;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.EnumSet;
import java.util.List;
import java.util.Optional;
import java.util.Set;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assertions.fail;

/**
 * The engine's box algebra ({@link BoundCalculator}) against a linear program over joint laws of
 * (Y1, Y0, T) ({@link JointLawProgram}, Commons Math {@code SimplexSolver}): for random discrete
 * outcome laws on a grid {a, a+h, ..., b}, the engine's interval must equal the LP's [min, max]
 * of E[Y1 - Y0] (sharpness and validity at once), and the engine must say "refuted" exactly when
 * the LP is infeasible. Checked for every single assumption, for every pair of assumptions
 * (which includes the documented combinations {@code mtr-positive,mts-positive} and
 * {@code optimizing-selection,sorting-on-gains}) and one random set of three or more per try, in
 * both outcome directions.
 *
 * <p>Outcome laws come from small integer counts, so the arms' means are often exactly equal; the
 * engine computes its means by Welford's update from unit-level observations while the LP uses the
 * exact cell probabilities.
 */
class SharpnessAgainstLinearProgramProperties {

    /** Every single assumption and every pair of distinct assumptions. */
    private static final List<Set<Assumption>> SETS = singlesAndPairs();

    /** Every single assumption and every pair of distinct assumptions (shared with the instrument properties). */
    static List<Set<Assumption>> singlesAndPairs() {
        List<Set<Assumption>> sets = new ArrayList<>();
        Assumption[] all = Assumption.values();
        for (int i = 0; i < all.length; i++) {
            sets.add(EnumSet.of(all[i]));
            for (int j = i + 1; j < all.length; j++) {
                sets.add(EnumSet.of(all[i], all[j]));
            }
        }
        return sets;
    }

    /** Counts of units per grid value and arm: the observed law is counts / total. */
    record GridData(double a, double h, int[] treatedCounts, int[] controlCounts) {

        double[] grid() {
            double[] y = new double[treatedCounts.length];
            for (int i = 0; i < y.length; i++) {
                y[i] = a + i * h;
            }
            return y;
        }

        OutcomeRange range(Direction better) {
            double[] y = grid();
            return new OutcomeRange(y[0], y[y.length - 1], better);
        }

        /** The arms as a stream would build them: one Welford update per unit. */
        ObservedArms arms() {
            double[] y = grid();
            ObservedArms arms = ObservedArms.empty();
            for (int i = 0; i < y.length; i++) {
                for (int u = 0; u < treatedCounts[i]; u++) {
                    arms = arms.add(true, y[i]);
                }
                for (int u = 0; u < controlCounts[i]; u++) {
                    arms = arms.add(false, y[i]);
                }
            }
            return arms;
        }

        JointLawProgram program() {
            double total = Arrays.stream(treatedCounts).sum() + Arrays.stream(controlCounts).sum();
            return new JointLawProgram(grid(),
                    Arrays.stream(treatedCounts).mapToDouble(c -> c / total).toArray(),
                    Arrays.stream(controlCounts).mapToDouble(c -> c / total).toArray());
        }

        @Override
        public String toString() {
            return describe();
        }

        String describe() {
            return "grid " + Arrays.toString(grid()) + ", treated counts " + Arrays.toString(treatedCounts)
                    + ", control counts " + Arrays.toString(controlCounts);
        }

        /** Sign of mu1 - mu0 in exact integer arithmetic (grid index means). */
        int meanOrder() {
            long n1 = Arrays.stream(treatedCounts).sum();
            long n0 = Arrays.stream(controlCounts).sum();
            long s1 = 0;
            long s0 = 0;
            for (int i = 0; i < treatedCounts.length; i++) {
                s1 += (long) i * treatedCounts[i];
                s0 += (long) i * controlCounts[i];
            }
            return Long.signum(s1 * n0 - s0 * n1);
        }
    }

    @Provide
    Arbitrary<GridData> gridData() {
        Arbitrary<Double> start = Arbitraries.integers().between(-3, 3).map(Integer::doubleValue);
        Arbitrary<Double> step = Arbitraries.of(0.25, 0.5, 1.0, 2.0);
        return Arbitraries.integers().between(2, 5).flatMap(k -> {
            Arbitrary<int[]> counts = Arbitraries.integers().between(0, 6).array(int[].class).ofSize(k);
            return Combinators.combine(start, step, counts, counts).as(GridData::new);
        }).filter(d -> Arrays.stream(d.treatedCounts()).sum() > 0 && Arrays.stream(d.controlCounts()).sum() > 0);
    }

    /** Three or more assumptions held together, beyond the pairs. */
    @Provide
    Arbitrary<Set<Assumption>> largerSet() {
        return largerSets();
    }

    /** Three or more assumptions held together (shared with the instrument properties). */
    static Arbitrary<Set<Assumption>> largerSets() {
        return Arbitraries.of(Assumption.class).set().ofMinSize(3).ofMaxSize(Assumption.values().length)
                .map(s -> EnumSet.copyOf(s));
    }

    @Property(tries = 200)
    void engineIntervalEqualsLinearProgramOverJointLaws(@ForAll("gridData") GridData data,
                                                        @ForAll("largerSet") Set<Assumption> larger) {
        ObservedArms arms = data.arms();
        JointLawProgram program = data.program();
        int order = data.meanOrder();
        Statistics.label("mu1 vs mu0").collect(order > 0 ? "mu1 > mu0" : order < 0 ? "mu1 < mu0" : "equal");
        for (Direction better : Direction.values()) {
            OutcomeRange range = data.range(better);
            double tolerance = 10 * JointLawProgram.TOLERANCE * (1 + range.width());
            List<Set<Assumption>> sets = new ArrayList<>(SETS);
            sets.add(larger);
            for (Set<Assumption> set : sets) {
                IdentifiedInterval engine = BoundCalculator.interval(arms, range, AssumptionSet.of(set));
                Optional<double[]> lp = program.ateRange(set, better);
                String where = AssumptionSet.of(set) + ", " + better.id() + " better, " + data.describe();
                if (lp.isEmpty()) {
                    assertEquals(BoundStatus.REFUTED, engine.status(), "LP infeasible but engine not refuted: " + where);
                } else {
                    assertTrue(engine.isIdentified(), "LP feasible but engine says " + engine.status().id() + ": " + where);
                    assertEquals(lp.get()[0], engine.lower(), tolerance, "lower end: " + where);
                    assertEquals(lp.get()[1], engine.upper(), tolerance, "upper end: " + where);
                }
                if (set.equals(EnumSet.of(Assumption.MTR_POSITIVE, Assumption.MTS_POSITIVE)) && better == Direction.HIGHER) {
                    Statistics.label("mtr-positive,mts-positive").collect(engine.status().id());
                }
            }
        }
        // The refutation branch must really be exercised (Manski & Pepper 2000: MTR+MTS refuted iff mu1 < mu0).
        Statistics.label("mtr-positive,mts-positive").coverage(c -> c.check("refuted").percentage(pct -> pct >= 15));
        Statistics.label("mu1 vs mu0").coverage(c -> c.check("equal").count(n -> n >= 1));
    }

    @Property(tries = 1)
    void theLinearProgramItselfDetectsInfeasibility() {
        // Guard against a vacuous check: a law with mu1 < mu0 is infeasible under MTR+ with MTS+.
        GridData data = new GridData(0, 1, new int[] {3, 1}, new int[] {1, 3});
        assertTrue(data.program().ateRange(EnumSet.of(Assumption.MTR_POSITIVE, Assumption.MTS_POSITIVE), Direction.HIGHER).isEmpty());
        Optional<double[]> worst = data.program().ateRange(EnumSet.of(Assumption.WORST_CASE), Direction.HIGHER);
        if (worst.isEmpty()) {
            fail("worst case must be feasible");
        }
        // Manski 1990: worst-case width equals b - a = 1.
        assertEquals(1.0, worst.get()[1] - worst.get()[0], 1e-9);
    }
}
