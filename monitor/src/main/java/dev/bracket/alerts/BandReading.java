package dev.bracket.alerts;

/**
 * A confidence band for the ATE as the alert rules read it: the lower confidence limit of the
 * identified interval's lower end and the upper confidence limit of its upper end, at a
 * confidence level, by a method.
 *
 * <p>{@code lower > upper} is allowed and meaningful: the band for the lower end then lies wholly
 * above the band for the upper end, so the assumptions contradict the data beyond sampling error
 * (see {@link AssumptionsRefutedRule}).
 */
public record BandReading(BandMethod method, double level, double lower, double upper) {

    public BandReading {
        if (method == null) {
            throw new IllegalArgumentException("band method is required");
        }
        if (!(level > 0 && level < 1)) {
            throw new IllegalArgumentException("band level must lie in (0, 1), was " + level);
        }
        if (!Double.isFinite(lower) || !Double.isFinite(upper)) {
            throw new IllegalArgumentException("band ends must be finite (lower=" + lower + ", upper=" + upper + ")");
        }
    }

    /** {@code upper - lower}; negative when the band is inverted. */
    public double width() {
        return upper - lower;
    }

    /** True when the lower end's band lies wholly above the upper end's band. */
    public boolean inverted() {
        return lower > upper;
    }
}
