package dev.bracket.demo;

import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.node.ObjectNode;

import java.time.Instant;

/**
 * One outcome event as the monitor reads it from the outcomes topic:
 * {@code {"study","unit","treated","outcome","time"}} plus {@code "stratum"} when the study is
 * stratified. {@code time} is an ISO-8601 instant in UTC.
 */
public record OutcomeEvent(String study, String unit, boolean treated, double outcome, Instant time, String stratum) {

    private static final ObjectMapper MAPPER = new ObjectMapper();

    /** The event the monitor sees for a simulated unit: the outcome of its own arm only. */
    public static OutcomeEvent observe(String study, SimulatedUnit unit, Instant time, boolean withStratum) {
        return new OutcomeEvent(study, unit.unitId(), unit.treated(), unit.observedOutcome(), time,
                withStratum ? unit.host().region() : null);
    }

    /** The JSON line sent to Kafka (no trailing newline). */
    public String toJson() {
        ObjectNode o = MAPPER.createObjectNode();
        o.put("study", study);
        o.put("unit", unit);
        o.put("treated", treated);
        o.put("outcome", outcome);
        o.put("time", time.toString());
        if (stratum != null) {
            o.put("stratum", stratum);
        }
        try {
            return MAPPER.writeValueAsString(o);
        } catch (JsonProcessingException e) {
            throw new IllegalStateException("cannot happen for a tree of strings and numbers", e);
        }
    }
}
