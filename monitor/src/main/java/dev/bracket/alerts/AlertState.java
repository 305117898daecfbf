package dev.bracket.alerts;

import java.time.Instant;
import java.util.ArrayList;
import java.util.List;

/**
 * The state machine of one alert key: quiet or firing. Immutable; {@link #next} returns the new
 * state with the transitions it caused. An alert fires once and resolves once: a condition that
 * keeps holding produces no further transition, and neither does one that stays gone.
 *
 * <p>Hysteresis (so that a band hovering at a threshold does not flap): a quiet alert fires on
 * the first {@link Verdict.Outcome#MET}; a firing alert resolves after {@code clearAfter}
 * consecutive {@link Verdict.Outcome#UNMET} verdicts, or at once on {@link Verdict.Outcome#CLEAR},
 * which the rules return only when the condition is gone by their configured clear margin. A
 * {@code MET} in between resets the count. {@link Verdict.Outcome#UNKNOWN} (too few units, no
 * band yet) changes nothing. Firing at once is sound because the default band is anytime-valid:
 * a look that excludes zero is a valid statement however many looks came before.
 *
 * @param key      what the alert is about
 * @param firing   whether the alert is firing
 * @param variant  which way the condition holds while firing (e.g. {@code positive}), else empty
 * @param sequence how many transitions the key has had (0 before the first)
 * @param origin   when the key's first transition happened; null before it
 * @param since    when the current phase began; null before the first transition
 * @param unmetRun consecutive {@code UNMET} verdicts while firing
 */
public record AlertState(AlertKey key, boolean firing, String variant, long sequence, Instant origin, Instant since,
                         int unmetRun) {

    /** A state with the transitions it produced; the list is empty when nothing changed. */
    public record Step(AlertState state, List<AlertTransition> transitions) {
        public Step {
            transitions = List.copyOf(transitions);
        }
    }

    public AlertState {
        if (key == null) {
            throw new IllegalArgumentException("alert state needs a key");
        }
        variant = variant == null ? "" : variant;
        if (sequence < 0 || unmetRun < 0) {
            throw new IllegalArgumentException("sequence and unmet run must be >= 0");
        }
        if (firing != (sequence % 2 == 1)) {
            throw new IllegalArgumentException("an alert fires on odd transitions and resolves on even ones (sequence "
                    + sequence + ", firing " + firing + ")");
        }
    }

    /** The state of a key that has never fired. */
    public static AlertState initial(AlertKey key) {
        return new AlertState(key, false, "", 0, null, null, 0);
    }

    /** The state a recorded transition left behind; used to restore state after a restart. */
    public static AlertState after(AlertTransition t) {
        boolean nowFiring = t.kind() == TransitionKind.FIRING;
        return new AlertState(t.key(), nowFiring, nowFiring ? t.variant() : "", t.sequence(), t.origin(), t.at(), 0);
    }

    /**
     * Applies one verdict.
     *
     * @param verdict    the rule's conclusion for this evaluation
     * @param evidence   the numbers the verdict was drawn from; attached to any transition
     * @param at         the evaluation time
     * @param clearAfter how many consecutive {@code UNMET} verdicts resolve a firing alert (at least 1)
     * @param meaning    the assumption set in words, for the alert text
     */
    public Step next(Verdict verdict, Evidence evidence, Instant at, int clearAfter, String meaning) {
        if (clearAfter < 1) {
            throw new IllegalArgumentException("clear-after must be at least 1, was " + clearAfter);
        }
        return switch (verdict.outcome()) {
            case UNKNOWN -> unchanged();
            case MET -> {
                if (!firing) {
                    yield fire(verdict, evidence, at, meaning);
                }
                if (variant.equals(verdict.variant())) {
                    yield new Step(withUnmetRun(0), List.of());
                }
                // The condition flipped sides between two looks (e.g. positive to negative):
                // the old claim is void at once and the new one fires.
                Step resolved = resolve(evidence, at, meaning, verdict.observation() + "; now " + verdict.variant());
                Step fired = resolved.state.fire(verdict, evidence, at, meaning);
                List<AlertTransition> both = new ArrayList<>(resolved.transitions);
                both.addAll(fired.transitions);
                yield new Step(fired.state, both);
            }
            case UNMET -> {
                if (!firing) {
                    yield unchanged();
                }
                int run = unmetRun + 1;
                yield run >= clearAfter
                        ? resolve(evidence, at, meaning, verdict.observation()
                                + (clearAfter > 1 ? "; for " + run + " consecutive evaluations" : ""))
                        : new Step(withUnmetRun(run), List.of());
            }
            case CLEAR -> firing ? resolve(evidence, at, meaning, verdict.observation()) : unchanged();
        };
    }

    private Step unchanged() {
        return new Step(this, List.of());
    }

    private AlertState withUnmetRun(int run) {
        return new AlertState(key, firing, variant, sequence, origin, since, run);
    }

    private Step fire(Verdict verdict, Evidence evidence, Instant at, String meaning) {
        Instant o = origin == null ? at : origin;
        long seq = sequence + 1;
        String title = key.rule().firingTitle() + (verdict.variant().isEmpty() ? "" : ": " + verdict.variant());
        AlertTransition t = new AlertTransition(AlertTransition.idFor(key, o, seq), key, TransitionKind.FIRING, seq, o,
                at, verdict.variant(), title + " (" + verdict.observation() + ")", at, meaning, evidence);
        return new Step(new AlertState(key, true, verdict.variant(), seq, o, at, 0), List.of(t));
    }

    private Step resolve(Evidence evidence, Instant at, String meaning, String observation) {
        long seq = sequence + 1;
        String title = key.rule().resolvedTitle() + (variant.isEmpty() ? "" : " (was " + variant + ")");
        AlertTransition t = new AlertTransition(AlertTransition.idFor(key, origin, seq), key, TransitionKind.RESOLVED,
                seq, origin, at, variant, title + " (" + observation + ")", since, meaning, evidence);
        return new Step(new AlertState(key, false, "", seq, origin, at, 0), List.of(t));
    }
}
