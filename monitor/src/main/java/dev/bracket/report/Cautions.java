package dev.bracket.report;

import java.util.List;

/**
 * The cautions shown wherever Bracket's results reach people: command help and tables, the
 * demo screen, published documents, alerts and the web page. One wording, kept here.
 */
public final class Cautions {

    public static final String CREDIBILITY = "An interval is only as credible as its assumptions.";
    public static final String NOT_ADVICE = "An identified sign is a statistical statement, not clinical or operational advice.";
    public static final String REGULATION = "Medical use follows local regulation, ethics approval and licensed clinical judgement.";

    /** The three sentences as one paragraph; a compile-time constant, so annotations can use it. */
    public static final String TEXT = CREDIBILITY + " " + NOT_ADVICE + " " + REGULATION;

    /** The three sentences, in order. */
    public static final List<String> ALL = List.of(CREDIBILITY, NOT_ADVICE, REGULATION);

    private Cautions() {
    }
}
