package dev.bracket.bands;

import java.util.Arrays;
import java.util.EnumSet;
import java.util.Set;
import java.util.stream.Collectors;

/** The two kinds of confidence band Bracket puts around an identified interval. */
public enum BandMethod {
    /**
     * Valid at one pre-planned look: Imbens &amp; Manski (2004) with Stoye's (2009) care for short
     * intervals. Looking again and again at a growing stream inflates its error rate.
     */
    FIXED_HORIZON("fixed"),
    /**
     * Valid however often and whenever the stream is looked at: time-uniform confidence sequences
     * (Howard, Ramdas, McAuliffe &amp; Sekhon 2021). The basis for alerts.
     */
    ANYTIME("anytime");

    private final String id;

    BandMethod(String id) {
        this.id = id;
    }

    /** The words for a choice of bands, as configuration ({@code bands}) and command line ({@code --bands}) take them. */
    public static final String CHOICES = "both, fixed, anytime or none";

    /** The identifier used in JSON output, configuration and on the command line. */
    public String id() {
        return id;
    }

    /** One band from its identifier ({@code fixed} or {@code anytime}). */
    public static BandMethod parse(String id) {
        return Arrays.stream(values()).filter(m -> m.id.equals(id)).findFirst()
                .orElseThrow(() -> new IllegalArgumentException("must be one of "
                        + Arrays.stream(values()).map(BandMethod::id).collect(Collectors.joining(", ")) + ", was '" + id + "'"));
    }

    /** A choice of bands: {@code both}, {@code fixed}, {@code anytime} or {@code none}. */
    public static Set<BandMethod> parseChoice(String choice) {
        return switch (choice == null ? "" : choice) {
            case "both" -> EnumSet.allOf(BandMethod.class);
            case "fixed" -> EnumSet.of(FIXED_HORIZON);
            case "anytime" -> EnumSet.of(ANYTIME);
            case "none" -> EnumSet.noneOf(BandMethod.class);
            default -> throw new IllegalArgumentException("must be " + CHOICES + ", was '" + choice + "'");
        };
    }
}
