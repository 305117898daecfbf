package dev.bracket.alerts;

/**
 * What one rule concludes from one observation, before hysteresis. {@code variant} names which
 * way a condition holds (for the sign: {@code positive} or {@code negative}; empty otherwise);
 * {@code observation} says in words what was seen, for the alert text.
 */
public record Verdict(Outcome outcome, String variant, String observation) {

    public enum Outcome {
        /** The condition holds: fire, or stay firing. */
        MET,
        /** The condition does not hold, but not by the clear margin: counts toward clear-after. */
        UNMET,
        /** The condition is gone by the clear margin: a firing alert resolves at once. */
        CLEAR,
        /** Nothing can be judged (too few units per arm, no band yet): the state is left as it is. */
        UNKNOWN
    }

    public Verdict {
        variant = variant == null ? "" : variant;
    }

    public static Verdict met(String variant, String observation) {
        return new Verdict(Outcome.MET, variant, observation);
    }

    public static Verdict unmet(String observation) {
        return new Verdict(Outcome.UNMET, "", observation);
    }

    public static Verdict clear(String observation) {
        return new Verdict(Outcome.CLEAR, "", observation);
    }

    public static Verdict unknown(String observation) {
        return new Verdict(Outcome.UNKNOWN, "", observation);
    }
}
