package dev.bracket.report;

import dev.bracket.bounds.Assumption;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.ObservedArms;

import java.util.Locale;

/**
 * What a report says about outcomes that have not arrived: whether exposures were reported at
 * all, and which assumption about pending outcomes each row makes.
 */
public final class PendingOutcomes {

    /** Shown when no exposure was reported: the interval then covers units with an outcome only. */
    public static final String NOT_ACCOUNTED = "No exposures reported: outcomes of units not yet reported are not accounted for;"
            + " the intervals cover only units whose outcome has arrived.";

    private PendingOutcomes() {
    }

    /** True when any exposure was reported for the pooled arms. */
    public static boolean exposuresReported(ObservedArms pooled) {
        return pooled.treated().exposed() > 0 || pooled.control().exposed() > 0;
    }

    /** The assumption a row makes about pending outcomes: {@code missing-at-random} or {@code in-range}. */
    public static String rowAssumption(AssumptionSet set) {
        return set.contains(Assumption.MISSING_AT_RANDOM) ? "missing-at-random" : "in-range";
    }

    /** One sentence for people: the state of exposures and what the rows assume about pending outcomes. */
    public static String note(ObservedArms pooled) {
        if (!exposuresReported(pooled)) {
            return NOT_ACCOUNTED;
        }
        return String.format(Locale.ROOT, "%d of %d units still await their outcome (treated %s, control %s pending)."
                        + " Rows without missing-at-random let every pending outcome lie anywhere in the outcome range;"
                        + " rows with it assume pending outcomes average like the reported ones in the same arm.",
                pooled.pending(), pooled.total(), percent(pooled.treated().pending(), pooled.treated().units()),
                percent(pooled.control().pending(), pooled.control().units()));
    }

    private static String percent(long part, long whole) {
        return whole == 0 ? "-" : String.format(Locale.ROOT, "%.1f%%", 100.0 * part / whole);
    }
}
