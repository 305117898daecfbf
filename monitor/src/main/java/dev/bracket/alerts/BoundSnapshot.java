package dev.bracket.alerts;

import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.IdentifiedInterval;
import dev.bracket.bounds.ObservedArms;

import java.time.Instant;
import java.util.EnumMap;
import java.util.Map;
import java.util.Optional;

/**
 * Everything the per-cell alert rules judge, for one study × assumption set × window at one
 * update: the pooled arms, the estimated identified interval and the confidence bands that were
 * computed (by method).
 */
public record BoundSnapshot(String study, AssumptionSet assumptions, String window, Instant at,
                            ObservedArms arms, IdentifiedInterval interval, Map<BandMethod, BandReading> bands) {

    public BoundSnapshot {
        if (study == null || assumptions == null || window == null || at == null || arms == null || interval == null) {
            throw new IllegalArgumentException("bound snapshot needs study, assumptions, window, time, arms and interval");
        }
        EnumMap<BandMethod, BandReading> copy = new EnumMap<>(BandMethod.class);
        bands.forEach((method, band) -> {
            if (band.method() != method) {
                throw new IllegalArgumentException("band filed under " + method.id() + " was computed by " + band.method().id());
            }
            copy.put(method, band);
        });
        bands = Map.copyOf(copy);
    }

    public Optional<BandReading> band(BandMethod method) {
        return Optional.ofNullable(bands.get(method));
    }

    /** The smaller of the two arms' unit counts. */
    public long smallerArm() {
        return Math.min(arms.treated().count(), arms.control().count());
    }
}
