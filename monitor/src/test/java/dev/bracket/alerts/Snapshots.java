package dev.bracket.alerts;

import dev.bracket.bands.BandMethod;
import dev.bracket.bands.ConfidenceBand;
import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.BoundCalculator;
import dev.bracket.bounds.IdentifiedInterval;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeRange;

import java.time.Instant;
import java.util.List;

/** Builds rule inputs for tests from arm summaries, the real bound calculator and a given band. */
public final class Snapshots {

    public static final OutcomeRange UNIT = new OutcomeRange(0, 1);
    public static final Instant T0 = Instant.parse("2026-03-01T09:00:00Z");

    private Snapshots() {
    }

    public static ObservedArms arms(long n1, double mu1, long n0, double mu0) {
        return new ObservedArms(ArmStatistics.ofSummary(n1, mu1, 0.3), ArmStatistics.ofSummary(n0, mu0, 0.3));
    }

    /**
     * A 95% band of the given method with the given ends; ends in the wrong order stand for a
     * refuted band (the lower end's band above the upper end's band).
     */
    public static ConfidenceBand band(BandMethod method, double lower, double upper) {
        return lower <= upper
                ? ConfidenceBand.of(method, 0.95, lower, upper, "constructed for the test")
                : ConfidenceBand.refuted(method, 0.95, "constructed for the test");
    }

    /** A snapshot whose interval is computed by {@link BoundCalculator} and whose anytime 95% band is given. */
    public static BoundSnapshot of(String study, String assumptions, ObservedArms arms, double bandLower, double bandUpper, Instant at) {
        AssumptionSet set = AssumptionSet.parse(assumptions);
        IdentifiedInterval iv = BoundCalculator.interval(arms, UNIT, set);
        return new BoundSnapshot(study, set, "cumulative", at, arms, iv, List.of(band(BandMethod.ANYTIME, bandLower, bandUpper)));
    }
}
