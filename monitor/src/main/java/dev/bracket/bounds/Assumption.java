package dev.bracket.bounds;

import java.util.Arrays;
import java.util.Locale;
import java.util.stream.Collectors;

/**
 * The identifying assumptions Bracket knows, each a pair of interval constraints on the
 * unobserved means {@code m10 = E[Y1 | T = 0]} and {@code m01 = E[Y0 | T = 1]} given the observed
 * {@code mu1 = E[Y | T = 1]} and {@code mu0 = E[Y | T = 0]}. The identifiers are a public
 * contract (command line, configuration, JSON output); keep them.
 *
 * <table>
 *   <caption>Constraints (higher outcome better; "lower better" mirrors the direction-dependent ones)</caption>
 *   <tr><th>identifier</th><th>m10</th><th>m01</th><th>source</th></tr>
 *   <tr><td>worst-case</td><td>[a, b]</td><td>[a, b]</td><td>Manski (1990), AER P&amp;P 80(2)</td></tr>
 *   <tr><td>mtr-positive</td><td>&ge; mu0</td><td>&le; mu1</td><td>Manski (1997), Econometrica 65(6)</td></tr>
 *   <tr><td>mtr-negative</td><td>&le; mu0</td><td>&ge; mu1</td><td>Manski (1997)</td></tr>
 *   <tr><td>mts-positive</td><td>&le; mu1</td><td>&ge; mu0</td><td>Manski &amp; Pepper (2000), Econometrica 68(4)</td></tr>
 *   <tr><td>mts-negative</td><td>&ge; mu1</td><td>&le; mu0</td><td>Manski &amp; Pepper (2000)</td></tr>
 *   <tr><td>optimizing-selection</td><td>&le; mu0</td><td>&le; mu1</td><td>Manski (1990); Roy (1951)</td></tr>
 *   <tr><td>sorting-on-gains</td><td>&le; mu1</td><td>&le; mu0</td><td>comparative-advantage (Roy-model) literature</td></tr>
 *   <tr><td>missing-at-random</td><td>&mdash;</td><td>&mdash;</td><td>Rubin (1976), Biometrika 63(3)</td></tr>
 * </table>
 *
 * <p>Here mu1 and mu0 are the means over all units of each arm, pending outcomes included; with
 * pending outcomes they are only known to lie in an {@link ArmMeanRange}, and every assumption
 * above is a statement about all units of an arm, whether their outcome has arrived or not.
 * {@code missing-at-random} constrains no unobserved mean: it says pending outcomes have the
 * same mean as the observed ones in the same arm, which shrinks the arm-mean range to the
 * complete-case mean (see {@link ArmMeanRange}). Without pending outcomes it changes nothing.
 */
public enum Assumption {

    WORST_CASE("worst-case",
            "outcomes lie in the declared range; nothing is assumed about how treatment was chosen"),
    MTR_POSITIVE("mtr-positive",
            "monotone treatment response: treatment never lowers any unit's outcome (Y1 >= Y0 for every unit)"),
    MTR_NEGATIVE("mtr-negative",
            "monotone treatment response: treatment never raises any unit's outcome (Y1 <= Y0 for every unit)"),
    MTS_POSITIVE("mts-positive",
            "monotone treatment selection: units that took treatment have mean potential outcomes at least as high as those that did not, in both arms"),
    MTS_NEGATIVE("mts-negative",
            "monotone treatment selection: units that took treatment have mean potential outcomes at most as high as those that did not, in both arms"),
    OPTIMIZING_SELECTION("optimizing-selection",
            "optimizing selection: every unit received the arm that was better for it"),
    SORTING_ON_GAINS("sorting-on-gains",
            "sorting on gains: treated units do better when treated than untreated units would, and untreated units do better untreated than treated units would (on average)"),
    MISSING_AT_RANDOM("missing-at-random",
            "missing at random: outcomes not yet reported have, on average, the same value as the reported ones in the same arm");

    private final String id;
    private final String meaning;

    Assumption(String id, String meaning) {
        this.id = id;
        this.meaning = meaning;
    }

    /** The public identifier, e.g. {@code mtr-positive}. */
    public String id() {
        return id;
    }

    /** The assumption in plain words, for people and alert text. */
    public String meaning() {
        return meaning;
    }

    /**
     * Narrows the box of unobserved means by this assumption's constraints (the table above). One
     * method for all constants, not one body per constant: called at every point where a bound is
     * evaluated, it then stays a direct call the compiler can inline.
     */
    UnobservedMeans constrain(UnobservedMeans box, double mu1, double mu0, Direction better) {
        boolean higher = better == Direction.HIGHER;
        return switch (this) {
            case WORST_CASE, MISSING_AT_RANDOM -> box; // missing-at-random acts on the arm means instead, see ArmMeanRange
            case MTR_POSITIVE -> box.m10AtLeast(mu0).m01AtMost(mu1);
            case MTR_NEGATIVE -> box.m10AtMost(mu0).m01AtLeast(mu1);
            case MTS_POSITIVE -> box.m10AtMost(mu1).m01AtLeast(mu0);
            case MTS_NEGATIVE -> box.m10AtLeast(mu1).m01AtMost(mu0);
            case OPTIMIZING_SELECTION -> higher ? box.m10AtMost(mu0).m01AtMost(mu1) : box.m10AtLeast(mu0).m01AtLeast(mu1);
            case SORTING_ON_GAINS -> higher ? box.m10AtMost(mu1).m01AtMost(mu0) : box.m10AtLeast(mu1).m01AtLeast(mu0);
        };
    }

    /** Looks an assumption up by its identifier; the error lists the known ones. */
    public static Assumption fromId(String id) {
        String key = id == null ? "" : id.trim().toLowerCase(Locale.ROOT);
        for (Assumption a : values()) {
            if (a.id.equals(key)) {
                return a;
            }
        }
        throw new IllegalArgumentException("unknown assumption '" + id + "'; known: " + knownIds());
    }

    /** The identifiers of all assumptions, comma-separated. */
    public static String knownIds() {
        return Arrays.stream(values()).map(Assumption::id).collect(Collectors.joining(", "));
    }
}
