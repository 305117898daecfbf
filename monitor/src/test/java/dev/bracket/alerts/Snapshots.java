package dev.bracket.alerts;

import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.BoundCalculator;
import dev.bracket.bounds.IdentifiedInterval;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeRange;

import java.time.Instant;
import java.util.Map;

/** Builds rule inputs for tests from arm summaries, the real bound calculator and a given band. */
final class Snapshots {

    static final OutcomeRange UNIT = new OutcomeRange(0, 1);
    static final Instant T0 = Instant.parse("2026-03-01T09:00:00Z");

    private Snapshots() {
    }

    static ObservedArms arms(long n1, double mu1, long n0, double mu0) {
        return new ObservedArms(ArmStatistics.ofSummary(n1, mu1, 0.3), ArmStatistics.ofSummary(n0, mu0, 0.3));
    }

    /** A snapshot whose interval is computed by {@link BoundCalculator} and whose anytime-valid 95% band is given. */
    static BoundSnapshot of(String study, String assumptions, ObservedArms arms, double bandLower, double bandUpper, Instant at) {
        AssumptionSet set = AssumptionSet.parse(assumptions);
        IdentifiedInterval iv = BoundCalculator.interval(arms, UNIT, set);
        return new BoundSnapshot(study, set, "cumulative", at, arms, iv,
                Map.of(BandMethod.ANYTIME_VALID, new BandReading(BandMethod.ANYTIME_VALID, 0.95, bandLower, bandUpper)));
    }

    /** A snapshot with a given interval (for rules that read it) and band. */
    static BoundSnapshot withInterval(IdentifiedInterval iv, double bandLower, double bandUpper, Instant at) {
        return new BoundSnapshot("s", AssumptionSet.parse("mtr-positive"), "cumulative", at, arms(100, 0.6, 100, 0.4), iv,
                Map.of(BandMethod.ANYTIME_VALID, new BandReading(BandMethod.ANYTIME_VALID, 0.95, bandLower, bandUpper)));
    }
}
