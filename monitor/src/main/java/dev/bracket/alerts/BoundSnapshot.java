package dev.bracket.alerts;

import dev.bracket.bands.BandMethod;
import dev.bracket.bands.ConfidenceBand;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.IdentifiedInterval;
import dev.bracket.bounds.ObservedArms;

import java.time.Instant;
import java.util.List;
import java.util.Optional;

/**
 * Everything the per-row alert rules judge, for one study × assumption set × window at one
 * update: the pooled arms, the estimated identified interval and the confidence bands that were
 * computed (at most one per method).
 */
public record BoundSnapshot(String study, AssumptionSet assumptions, String window, Instant at,
                            ObservedArms arms, IdentifiedInterval interval, List<ConfidenceBand> bands) {

    public BoundSnapshot {
        if (study == null || assumptions == null || window == null || at == null || arms == null || interval == null) {
            throw new IllegalArgumentException("bound snapshot needs study, assumptions, window, time, arms and interval");
        }
        bands = List.copyOf(bands);
        if (bands.stream().map(ConfidenceBand::method).distinct().count() != bands.size()) {
            throw new IllegalArgumentException("a snapshot holds at most one band per method");
        }
    }

    /** The band computed by {@code method}, if one was. */
    public Optional<ConfidenceBand> band(BandMethod method) {
        return bands.stream().filter(b -> b.method() == method).findFirst();
    }

    /** The smaller of the two arms' unit counts. */
    public long smallerArm() {
        return Math.min(arms.treated().count(), arms.control().count());
    }
}
