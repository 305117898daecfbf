package dev.bracket.alerts;

import dev.bracket.bands.ConfidenceBand;
import dev.bracket.bounds.IdentifiedInterval;
import dev.bracket.bounds.ObservedArms;

import java.time.Duration;
import java.time.Instant;
import java.util.Collections;
import java.util.LinkedHashMap;
import java.util.Map;

/** The numbers that justify an alert transition; one shape per kind of rule. */
public sealed interface Evidence {

    /**
     * For per-row rules: the pooled arms, the estimated identified interval, the band that was
     * judged and the rule's configured limits by name (e.g. {@code width}).
     */
    record OfBand(ObservedArms arms, IdentifiedInterval interval, ConfidenceBand band, Map<String, Double> limits)
            implements Evidence {
        public OfBand {
            limits = Collections.unmodifiableMap(new LinkedHashMap<>(limits));
        }
    }

    /** For {@link AlertRule#STREAM_STALLED}: when the last event arrived and how long the study has been silent. */
    record OfSilence(Instant lastEventAt, Duration silentFor, Duration limit) implements Evidence {
    }

    /**
     * For {@link AlertRule#DATA_QUALITY}: event counts over the period ending now. {@code rejected}
     * counts every rejected event; {@code outOfRange} is the part of it rejected because the
     * outcome lay outside the study's declared range.
     */
    record OfQuality(Duration period, long accepted, long rejected, long outOfRange, double maxShare)
            implements Evidence {
        /** Rejected share of all events in the period; 0 when there were none. */
        public double rejectedShare() {
            long total = accepted + rejected;
            return total == 0 ? 0.0 : (double) rejected / total;
        }
    }
}
