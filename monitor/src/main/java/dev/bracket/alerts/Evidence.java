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
     * For {@link AlertRule#DATA_QUALITY}: record counts over the period ending now. {@code rejected}
     * counts every rejected event that names the study (any reason); {@code outOfRange} is the
     * part of it rejected because the outcome lay outside the study's declared range;
     * {@code unattributed} counts the rejected records of the input topics no study could be read
     * from (not JSON, no study field, unknown study, too large), which may be any study's.
     */
    record OfQuality(Duration period, long accepted, long rejected, long outOfRange, long unattributed, double maxShare)
            implements Evidence {
        /** All records counted: accepted, rejected and unattributed. */
        public long total() {
            return accepted + rejected + unattributed;
        }

        /** Rejected share (unattributed records included) of all records in the period; 0 when there were none. */
        public double rejectedShare() {
            long total = total();
            return total == 0 ? 0.0 : (double) (rejected + unattributed) / total;
        }
    }
}
