package dev.bracket.bounds;

import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import static org.junit.jupiter.api.Assertions.assertEquals;

/**
 * The study ATE is the share-weighted sum of stratum ATEs (law of total expectation), so its
 * identified set is the share-weighted sum of the stratum intervals. Checked against arithmetic
 * done here from the stratum formulas (Manski 1990 worst case; Manski 1997 MTR).
 */
class StratifiedBoundsTest {

    private static final OutcomeRange RANGE = new OutcomeRange(0, 10);

    private static ObservedArms arms(long n1, double mu1, long n0, double mu0) {
        return new ObservedArms(ArmStatistics.ofSummary(n1, mu1, 0), ArmStatistics.ofSummary(n0, mu0, 0));
    }

    /** Manski (1990) worst-case bounds of one stratum, written out. */
    private static double[] worstCase(long n1, double mu1, long n0, double mu0) {
        double p = (double) n1 / (n1 + n0);
        double a = RANGE.min();
        double b = RANGE.max();
        return new double[] {
                p * mu1 + (1 - p) * a - (1 - p) * mu0 - p * b,
                p * mu1 + (1 - p) * b - (1 - p) * mu0 - p * a};
    }

    @Test
    @DisplayName("worst case: the study interval is the share-weighted sum of the stratum intervals")
    void weightedSumOfStrata() {
        StudyCells study = StudyCells.empty()
                .with("north", StudyCells.NONE, arms(30, 6.0, 70, 4.0))
                .with("south", StudyCells.NONE, arms(120, 3.0, 80, 5.5))
                .with("west", StudyCells.NONE, arms(10, 9.0, 90, 1.0));
        double[] north = worstCase(30, 6.0, 70, 4.0);
        double[] south = worstCase(120, 3.0, 80, 5.5);
        double[] west = worstCase(10, 9.0, 90, 1.0);
        // Shares 100/400, 200/400, 100/400.
        double lower = 0.25 * north[0] + 0.5 * south[0] + 0.25 * west[0];
        double upper = 0.25 * north[1] + 0.5 * south[1] + 0.25 * west[1];

        StratifiedBounds.Result r = StratifiedBounds.interval(study, RANGE, AssumptionSet.parse("worst-case"));

        assertEquals(lower, r.overall().lower(), 1e-12);
        assertEquals(upper, r.overall().upper(), 1e-12);
        assertEquals(north[0], r.perStratum().get("north").lower(), 1e-12);
        assertEquals(south[1], r.perStratum().get("south").upper(), 1e-12);
        // Each stratum's worst-case width is b - a, so the weighted sum is too (Manski 1990).
        assertEquals(RANGE.width(), r.overall().width(), 1e-12);
    }

    @Test
    @DisplayName("a stratum with no units yet has weight zero and does not hold back the study interval")
    void emptyStratumCarriesNoWeight() {
        StudyCells study = StudyCells.empty()
                .with("north", StudyCells.NONE, arms(30, 6.0, 70, 4.0))
                .with("east", StudyCells.NONE, arms(0, 0.0, 0, 0.0));
        double[] north = worstCase(30, 6.0, 70, 4.0);

        StratifiedBounds.Result r = StratifiedBounds.interval(study, RANGE, AssumptionSet.parse("worst-case"));

        assertEquals(BoundStatus.BOUNDED, r.overall().status());
        assertEquals(north[0], r.overall().lower(), 1e-12);
        assertEquals(north[1], r.overall().upper(), 1e-12);
    }

    @Test
    @DisplayName("a stratum with units in one arm only gets Manski's worst case with p = 1 (or 0); the study stays bounded")
    void oneArmedStratumIsWorstCase() {
        StudyCells study = StudyCells.empty()
                .with("north", StudyCells.NONE, arms(30, 6.0, 70, 4.0))
                .with("pilot", StudyCells.NONE, arms(20, 7.5, 0, 0.0))
                .with("holdout", StudyCells.NONE, arms(0, 0.0, 30, 2.0));
        // Worst case (Manski 1990) with p = 1: [mu1 - b, mu1 - a]; with p = 0: [a - mu0, b - mu0];
        // the general formula above gives the same with n0 = 0 or n1 = 0.
        double[] north = worstCase(30, 6.0, 70, 4.0);
        double[] pilot = {7.5 - 10, 7.5 - 0};
        double[] holdout = {0 - 2.0, 10 - 2.0};
        assertEquals(pilot[0], worstCase(20, 7.5, 0, 0.0)[0], 1e-12);
        assertEquals(holdout[1], worstCase(0, 0.0, 30, 2.0)[1], 1e-12);

        for (String set : new String[] {"worst-case", "mts-positive"}) {
            StratifiedBounds.Result r = StratifiedBounds.interval(study, RANGE, AssumptionSet.parse(set));
            assertEquals(BoundStatus.BOUNDED, r.perStratum().get("pilot").status(), set);
            assertEquals(pilot[0], r.perStratum().get("pilot").lower(), 1e-12);
            assertEquals(pilot[1], r.perStratum().get("pilot").upper(), 1e-12);
            assertEquals(holdout[0], r.perStratum().get("holdout").lower(), 1e-12);
            assertEquals(holdout[1], r.perStratum().get("holdout").upper(), 1e-12);
            assertEquals(BoundStatus.BOUNDED, r.overall().status(), set);
        }
        StratifiedBounds.Result worst = StratifiedBounds.interval(study, RANGE, AssumptionSet.parse("worst-case"));
        // Shares 100/150, 20/150, 30/150.
        assertEquals((100 * north[0] + 20 * pilot[0] + 30 * holdout[0]) / 150, worst.overall().lower(), 1e-12);
        assertEquals((100 * north[1] + 20 * pilot[1] + 30 * holdout[1]) / 150, worst.overall().upper(), 1e-12);
        assertEquals(java.util.Set.of("pilot", "holdout"), java.util.Set.copyOf(StratifiedBounds.oneArmed(study)));
    }

    @Test
    @DisplayName("MTR: each stratum is [0, its worst-case upper]; the study interval weights them by shares")
    void weightedSumUnderMonotoneResponse() {
        StudyCells study = StudyCells.empty()
                .with("a", StudyCells.NONE, arms(25, 7.0, 75, 2.0))
                .with("b", StudyCells.NONE, arms(300, 5.0, 100, 6.0));
        // Manski (1997): MTR lower end 0, upper end the worst-case upper end.
        double upper = 0.2 * worstCase(25, 7.0, 75, 2.0)[1] + 0.8 * worstCase(300, 5.0, 100, 6.0)[1];

        IdentifiedInterval overall = StratifiedBounds.interval(study, RANGE, AssumptionSet.parse("mtr-positive")).overall();

        assertEquals(0.0, overall.lower(), 1e-12);
        assertEquals(upper, overall.upper(), 1e-12);
    }

    @Test
    @DisplayName("a stratum with an instrument contributes its intersected interval, weighted by its share")
    void stratumWithInstrument() {
        // Stratum "x": two instrument levels; stratum "y": a single cell.
        StudyCells study = StudyCells.empty()
                .with("x", "z0", arms(0, 0, 50, 2.0))
                .with("x", "z1", arms(30, 8.0, 20, 1.0))
                .with("y", StudyCells.NONE, arms(40, 5.0, 60, 5.0));
        // Manski (1990) mean independence in "x": E[Y0] = 2.0 from z0 (no treated there) and
        // [0.4*1 + 0.6*0, 0.4*1 + 0.6*10] = [0.4, 6.4] from z1: E[Y0] = 2.0; E[Y1] in
        // [0.6*8, 0.6*8 + 0.4*10] = [4.8, 8.8] from z1 and [0, 10] from z0. ATE in [2.8, 6.8].
        double[] y = worstCase(40, 5.0, 60, 5.0);
        double lower = 0.5 * 2.8 + 0.5 * y[0];
        double upper = 0.5 * 6.8 + 0.5 * y[1];

        StratifiedBounds.Result r = StratifiedBounds.interval(study, RANGE, AssumptionSet.parse("worst-case"));

        assertEquals(2.8, r.perStratum().get("x").lower(), 1e-12);
        assertEquals(6.8, r.perStratum().get("x").upper(), 1e-12);
        assertEquals(lower, r.overall().lower(), 1e-12);
        assertEquals(upper, r.overall().upper(), 1e-12);
    }

    @Test
    @DisplayName("one refuted stratum refutes the study; a study without a control arm anywhere is insufficient")
    void refutedAndInsufficientStrata() {
        StudyCells refuting = StudyCells.empty()
                .with("ok", StudyCells.NONE, arms(10, 6.0, 10, 4.0))
                .with("bad", StudyCells.NONE, arms(10, 3.0, 10, 4.0)); // mu1 < mu0 under MTR+ and MTS+
        assertEquals(BoundStatus.REFUTED,
                StratifiedBounds.interval(refuting, RANGE, AssumptionSet.parse("mtr-positive,mts-positive")).overall().status());

        StudyCells noControl = StudyCells.empty()
                .with("a", StudyCells.NONE, arms(10, 6.0, 0, 0))
                .with("b", StudyCells.NONE, arms(5, 3.0, 0, 0));
        StratifiedBounds.Result r = StratifiedBounds.interval(noControl, RANGE, AssumptionSet.parse("worst-case"));
        assertEquals(BoundStatus.INSUFFICIENT_DATA, r.overall().status());
        assertEquals(java.util.List.of(), StratifiedBounds.oneArmed(noControl));
    }
}
