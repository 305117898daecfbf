package dev.bracket.bounds;

/**
 * The response types of a unit when treatment and outcome are binary and an instrument has K
 * levels (Balke &amp; Pearl 1997, JASA 92(439), §2, there for K = 2): the arm the unit would take
 * at each level, a function from the K levels to {untreated, treated} (2^K of them), together with
 * its two potential outcomes (Y0, Y1) in {0, 1}^2 on the unit scale. Under an independent
 * instrument every unit keeps its type whatever level it is assigned, so the observed law at
 * level z is the law of types seen through z:
 *
 * <pre>
 *   P(T = 1, Y = y | Z = z) = sum over types with takes(z) and Y1 = y of q(type)
 *   P(T = 0, Y = y | Z = z) = sum over types with not takes(z) and Y0 = y of q(type)
 * </pre>
 *
 * A type is numbered {@code takes << 2 | Y0 << 1 | Y1}, where bit z of {@code takes} says whether
 * the unit takes treatment at level z.
 */
final class ResponseTypes {

    private final int levels;

    /** @param levels the number of instrument levels K, at least 1 */
    ResponseTypes(int levels) {
        if (levels < 1 || levels > 28) {
            throw new IllegalArgumentException("response types need 1 to 28 instrument levels, were " + levels);
        }
        this.levels = levels;
    }

    int levels() {
        return levels;
    }

    /** The number of types, {@code 4 * 2^K}. */
    int count() {
        return 4 << levels;
    }

    /** Whether a unit of this type takes treatment when its instrument is at {@code level}. */
    boolean takes(int type, int level) {
        return ((type >>> (2 + level)) & 1) == 1;
    }

    /** Its potential outcome untreated, 0 or 1. */
    int y0(int type) {
        return (type >>> 1) & 1;
    }

    /** Its potential outcome treated, 0 or 1. */
    int y1(int type) {
        return type & 1;
    }
}
