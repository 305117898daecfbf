package dev.bracket.report;

import dev.bracket.bands.ConfidenceBand;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.BoundStatus;
import dev.bracket.bounds.IdentifiedInterval;

import java.util.Collections;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;

/**
 * One line of a report: an assumption set, its identified interval for the whole study,
 * (for stratified studies) each stratum's interval, and the confidence bands requested around
 * the study's interval (none unless asked for). The JSON shape of a row is shared by
 * {@code calc --json}, {@code replay --json} and the HTTP API.
 */
public record BoundRow(AssumptionSet assumptions, IdentifiedInterval interval, Map<String, IdentifiedInterval> perStratum,
                       List<ConfidenceBand> bands) {

    public BoundRow {
        // Sorted by stratum name once here: reports write them in that order.
        perStratum = perStratum.isEmpty() ? Map.of() : Collections.unmodifiableSortedMap(new TreeMap<>(perStratum));
        bands = List.copyOf(bands);
    }

    /** A row without confidence bands. */
    public BoundRow(AssumptionSet assumptions, IdentifiedInterval interval, Map<String, IdentifiedInterval> perStratum) {
        this(assumptions, interval, perStratum, List.of());
    }

    /** "positive", "negative" or "undetermined": whether the identified set lies on one side of zero. */
    /**
     * The bands a reader is shown (table, JSON, page). For a refuted row only the bands that are
     * refuted too (beyond sampling error): there is no interval to put a band around, and a
     * bounded band's ends and sign would read as a finding. The alert evaluator judges all of {@link #bands()}.
     */
    public List<ConfidenceBand> shownBands() {
        return interval.status() != BoundStatus.REFUTED ? bands
                : bands.stream().filter(b -> b.status() == BoundStatus.REFUTED).toList();
    }

    public String sign() {
        return signWord(interval.identifiedSign());
    }

    /** The word for a sign: +1 "positive", -1 "negative", otherwise "undetermined". Shared with the bands. */
    public static String signWord(int sign) {
        return switch (sign) {
            case 1 -> "positive";
            case -1 -> "negative";
            default -> "undetermined";
        };
    }
}
