package dev.bracket.alerts;

import java.util.List;

/** The cautions every alert carries to the people who read it. */
public final class Cautions {

    public static final List<String> ALL = List.of(
            "An interval is only as credible as its assumptions.",
            "An identified sign is a statistical statement, not clinical or operational advice.",
            "Medical use follows local regulation, ethics approval and licensed clinical judgement.");

    private Cautions() {
    }
}
