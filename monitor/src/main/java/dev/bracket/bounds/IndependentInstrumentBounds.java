package dev.bracket.bounds;

import java.util.ArrayList;
import java.util.List;
import java.util.Map;

/**
 * Sharp bounds on the ATE of a binary outcome when the instrument Z is independent of every
 * unit's response type: of the arm it would take at each level and of its potential outcomes
 * (Y0, Y1) jointly (Balke &amp; Pearl 1997, JASA 92(439); the linear programs are in
 * {@link ResponseTypeProgram}). Independence implies mean independence, so these bounds lie
 * inside {@link InstrumentBounds}' and are often narrower when compliance is two-sided; they
 * coincide when nobody at some level can get treatment (one-sided non-compliance), as in the
 * published trials of the tests.
 *
 * <p>Levels with no units are skipped. Insufficient data unless both arms have units somewhere.
 * The programs have {@code 4 * 2^K} variables for K levels; beyond {@value #MAX_LEVELS} levels
 * with units the mean-independence bounds are reported instead, which are valid under
 * independence too but not sharp.
 *
 * <p>Pending outcomes: each level's arm means are then the boxes of their {@link ArmMeanRange}s,
 * and the program takes the lowest and highest ATE over them. The mean of a binary outcome fixes
 * its law and pending units' outcomes are unrestricted (Horowitz &amp; Manski 2000, JASA 95(449)),
 * so every point of the boxes is attained by some law consistent with the data.
 */
public final class IndependentInstrumentBounds {

    /** The most instrument levels solved by linear programming (4096 response types). */
    public static final int MAX_LEVELS = 10;

    private IndependentInstrumentBounds() {
    }

    /** The ATE interval from the levels' arms (level name to arms). */
    public static IdentifiedInterval interval(Map<String, ObservedArms> levels, OutcomeRange range, AssumptionSet assumptions) {
        requireBinary(range);
        long treated = 0;
        long control = 0;
        List<ObservablesBox> points = new ArrayList<>();
        for (ObservedArms arms : levels.values()) {
            if (arms.total() > 0) {
                treated += arms.treated().units();
                control += arms.control().units();
                points.add(ObservablesBox.at(arms, range, assumptions));
            }
        }
        if (treated == 0 || control == 0) {
            return IdentifiedInterval.insufficientData();
        }
        if (points.size() > MAX_LEVELS) {
            return InstrumentBounds.interval(levels, range, assumptions);
        }
        return overBoxes(points, range, assumptions);
    }

    /**
     * The lowest lower and highest upper bound over every point of the levels' boxes (one box per
     * level with units, at most {@value #MAX_LEVELS}); refuted when no point of the boxes is
     * compatible with the assumptions. For single-point boxes these are the sharp bounds.
     */
    public static IdentifiedInterval overBoxes(List<ObservablesBox> levels, OutcomeRange range, AssumptionSet assumptions) {
        requireBinary(range);
        if (levels.isEmpty() || levels.size() > MAX_LEVELS) {
            throw new IllegalArgumentException("the program takes 1 to " + MAX_LEVELS + " instrument levels, was given " + levels.size());
        }
        double width = range.width();
        return new ResponseTypeProgram(levels, range, assumptions).ateRange()
                .map(ends -> IdentifiedInterval.spanning(width * ends[0], width * ends[1]))
                .orElseGet(IdentifiedInterval::refuted);
    }

    private static void requireBinary(OutcomeRange range) {
        if (range.kind() != OutcomeKind.BINARY) {
            throw new IllegalArgumentException("an independent instrument needs a binary outcome (every outcome equal to min or max); "
                    + "declare the outcome kind binary, or assume a mean-independent instrument");
        }
    }
}
