package dev.bracket.bands;

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

    /** The identifier used in JSON output and on the command line. */
    public String id() {
        return id;
    }
}
