package dev.bracket.bands;

import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.Assumption;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.BoundStatus;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.bounds.StudyCells;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.util.ArrayList;
import java.util.List;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

class ConfidenceBandTest {

    private static final OutcomeRange UNIT = new OutcomeRange(0, 1);

    @Test
    @DisplayName("a band above zero identifies a positive sign; one across zero does not")
    void signAndWidth() {
        ConfidenceBand above = ConfidenceBand.of(BandMethod.ANYTIME, 0.95, 0.02, 0.3, "test");
        assertTrue(above.excludesZero());
        assertEquals(1, above.sign());
        assertEquals(0.28, above.width(), 1e-15);
        ConfidenceBand below = ConfidenceBand.of(BandMethod.ANYTIME, 0.95, -0.3, -0.01, "test");
        assertEquals(-1, below.sign());
        ConfidenceBand across = ConfidenceBand.of(BandMethod.FIXED_HORIZON, 0.95, -0.1, 0.3, "test");
        assertFalse(across.excludesZero());
        assertEquals(0, across.sign());
        assertTrue(across.contains(0));
    }

    @Test
    @DisplayName("refuted and insufficient bands identify nothing and contain nothing")
    void nonIdentifiedBands() {
        for (ConfidenceBand band : List.of(ConfidenceBand.refuted(BandMethod.ANYTIME, 0.9, "test"),
                ConfidenceBand.insufficientData(BandMethod.FIXED_HORIZON, 0.9, "test"))) {
            assertFalse(band.isBounded());
            assertFalse(band.excludesZero());
            assertEquals(0, band.sign());
            assertFalse(band.contains(0));
        }
        assertTrue(ConfidenceBand.refuted(BandMethod.ANYTIME, 0.9, "test").isRefuted());
    }

    @Test
    void rejectsInconsistentValues() {
        assertThrows(IllegalArgumentException.class, () -> ConfidenceBand.of(BandMethod.ANYTIME, 0.95, 0.3, 0.2, "x"));
        assertThrows(IllegalArgumentException.class, () -> ConfidenceBand.of(BandMethod.ANYTIME, 1.0, 0.1, 0.2, "x"));
        assertThrows(IllegalArgumentException.class, () -> ConfidenceBand.of(BandMethod.ANYTIME, 0.95, Double.NaN, 0.2, "x"));
        assertThrows(IllegalArgumentException.class, () -> new BandConfig(0, BandConfig.both(0.9).methods(), VarianceBasis.SAMPLE, 10));
    }

    @Test
    @DisplayName("tiny and empty cells give insufficient data or a finite band, never NaN and never an exception")
    void degenerateCellsNeverCrash() {
        BandConfig settings = BandConfig.both(0.95);
        List<ArmStatistics> arms = new ArrayList<>();
        arms.add(ArmStatistics.empty());
        arms.add(ArmStatistics.of(0.0));
        arms.add(ArmStatistics.of(1.0));
        arms.add(ArmStatistics.of(1.0, 1.0));
        arms.add(ArmStatistics.of(0.0, 0.0, 0.0));
        arms.add(ArmStatistics.of(0.0, 1.0, 0.5));
        for (ArmStatistics treated : arms) {
            for (ArmStatistics control : arms) {
                StudyCells cells = StudyCells.single(new ObservedArms(treated, control));
                for (Assumption a : Assumption.values()) {
                    for (ConfidenceBand band : settings.bands(cells, UNIT, AssumptionSet.of(a, Assumption.MTS_POSITIVE))) {
                        if (band.isBounded()) {
                            assertTrue(Double.isFinite(band.lower()) && Double.isFinite(band.upper()), band.toString());
                        }
                        boolean emptyArm = treated.isEmpty() || control.isEmpty();
                        boolean singleUnit = treated.count() == 1 || control.count() == 1;
                        if (emptyArm || (band.method() == BandMethod.FIXED_HORIZON && singleUnit)) {
                            assertEquals(BoundStatus.INSUFFICIENT_DATA, band.status());
                        }
                    }
                }
            }
        }
    }

    @Test
    @DisplayName("a stratum with no units carries no weight in either band")
    void emptyStratumIsIgnored() {
        ObservedArms arms = new ObservedArms(ArmStatistics.ofSummary(300, 0.6, 0.4), ArmStatistics.ofSummary(500, 0.4, 0.45));
        StudyCells one = StudyCells.single(arms);
        StudyCells withEmpty = StudyCells.empty().with("a", StudyCells.NONE, arms).with("b", StudyCells.NONE, ObservedArms.empty());
        BandConfig settings = BandConfig.both(0.95);
        AssumptionSet set = AssumptionSet.parse("mtr-positive");
        List<ConfidenceBand> expected = settings.bands(one, UNIT, set);
        List<ConfidenceBand> actual = settings.bands(withEmpty, UNIT, set);
        for (int i = 0; i < expected.size(); i++) {
            assertTrue(expected.get(i).isBounded());
            assertEquals(expected.get(i).lower(), actual.get(i).lower(), 1e-15);
            assertEquals(expected.get(i).upper(), actual.get(i).upper(), 1e-15);
        }
    }

    @Test
    @DisplayName("anytime band: much data contradicting MTR+MTS gives refuted; few data do not")
    void anytimeRefutation() {
        // mtr-positive with mts-positive requires mu1 >= mu0 (Manski & Pepper 2000, Econometrica 68(4)).
        AssumptionSet set = AssumptionSet.parse("mtr-positive,mts-positive");
        AnytimeBand anytime = new AnytimeBand(0.95);
        ObservedArms many = new ObservedArms(ArmStatistics.ofSummary(5000, 0.3, 0.46), ArmStatistics.ofSummary(5000, 0.5, 0.5));
        assertEquals(BoundStatus.REFUTED, anytime.ofCell(many, UNIT, set).status());
        ObservedArms few = new ObservedArms(ArmStatistics.ofSummary(20, 0.3, 0.47), ArmStatistics.ofSummary(20, 0.5, 0.51));
        ConfidenceBand band = anytime.ofCell(few, UNIT, set);
        assertTrue(band.isBounded(), band.toString());
        // Lower end 0 under these assumptions; the upper end mu1 - mu0 reaches its largest value at the box corner.
        assertEquals(0, band.lower(), 0);
        assertTrue(band.upper() > 0);
    }
}
