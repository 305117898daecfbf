package dev.bracket.config;

/**
 * Names of the JSON fields an input topic's events use for each piece Bracket reads. The
 * defaults are the field names themselves; a topic whose producer says {@code canary} for
 * treatment maps {@code treated: canary}.
 */
public record FieldMapping(String study, String unit, String treated, String outcome, String time,
                           String stratum, String instrument, String id) {

    public static final FieldMapping DEFAULT = new FieldMapping(
            "study", "unit", "treated", "outcome", "time", "stratum", "instrument", "id");
}
