package dev.bracket.bounds;

import java.util.Locale;
import java.util.Map;

/**
 * What is assumed about an instrument Z (an assignment, encouragement or lottery that moves who
 * takes treatment but has no effect of its own on the outcome) when the data carry instrument
 * levels. Without instrument levels neither assumption restricts anything.
 *
 * <table>
 *   <caption>The two instrument assumptions</caption>
 *   <tr><th>identifier</th><th>assumed</th><th>bounds</th><th>source</th></tr>
 *   <tr><td>mean-independent</td><td>E[Y1 | Z] and E[Y0 | Z] do not depend on Z</td>
 *       <td>{@link InstrumentBounds}: intersection over levels; any outcome range</td>
 *       <td>Manski (1990), AER P&amp;P 80(2)</td></tr>
 *   <tr><td>independent</td><td>Z is independent of every unit's treatment response to each level
 *       and of its potential outcomes (Y0, Y1) jointly</td>
 *       <td>{@link IndependentInstrumentBounds}: linear program over response types; binary outcome</td>
 *       <td>Balke &amp; Pearl (1997), JASA 92(439)</td></tr>
 * </table>
 *
 * Independence implies mean independence, so its bounds lie inside the mean-independence bounds
 * and are often narrower when compliance is two-sided.
 */
public enum InstrumentAssumption {

    MEAN_INDEPENDENT("mean-independent",
            "the mean potential outcomes do not depend on the instrument level") {
        @Override
        IdentifiedInterval interval(Map<String, ObservedArms> levels, OutcomeRange range, AssumptionSet assumptions) {
            return InstrumentBounds.interval(levels, range, assumptions);
        }
    },
    INDEPENDENT("independent",
            "the instrument level is independent of how each unit would take treatment at every level and of its potential outcomes") {
        @Override
        IdentifiedInterval interval(Map<String, ObservedArms> levels, OutcomeRange range, AssumptionSet assumptions) {
            return IndependentInstrumentBounds.interval(levels, range, assumptions);
        }
    };

    private final String id;
    private final String meaning;

    InstrumentAssumption(String id, String meaning) {
        this.id = id;
        this.meaning = meaning;
    }

    /** The public identifier: {@code mean-independent} or {@code independent}. */
    public String id() {
        return id;
    }

    /** The assumption in plain words. */
    public String meaning() {
        return meaning;
    }

    /** The ATE interval of one stratum with several instrument levels (level name to arms). */
    abstract IdentifiedInterval interval(Map<String, ObservedArms> levels, OutcomeRange range, AssumptionSet assumptions);

    /**
     * Whether this assumption can be used with outcomes of the given kind; {@code independent}
     * needs binary outcomes.
     */
    public boolean supports(OutcomeKind kind) {
        return this == MEAN_INDEPENDENT || kind == OutcomeKind.BINARY;
    }

    /** Parses {@code mean-independent} or {@code independent} (case-insensitive). */
    public static InstrumentAssumption parse(String text) {
        String t = text == null ? "" : text.trim().toLowerCase(Locale.ROOT);
        for (InstrumentAssumption a : values()) {
            if (a.id.equals(t)) {
                return a;
            }
        }
        throw new IllegalArgumentException("must be 'mean-independent' or 'independent', was '" + text + "'");
    }
}
