package dev.bracket.report;

import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.IdentifiedInterval;

import java.util.Map;

/**
 * One line of a report: an assumption set, its identified interval for the whole study, and
 * (for stratified studies) each stratum's interval. The JSON shape of a row is shared by
 * {@code calc --json}, {@code replay --json} and the HTTP API.
 */
public record BoundRow(AssumptionSet assumptions, IdentifiedInterval interval, Map<String, IdentifiedInterval> perStratum) {

    public BoundRow {
        perStratum = Map.copyOf(perStratum);
    }

    /** "positive", "negative" or "undetermined": whether the identified set lies on one side of zero. */
    public String sign() {
        return switch (interval.identifiedSign()) {
            case 1 -> "positive";
            case -1 -> "negative";
            default -> "undetermined";
        };
    }
}
