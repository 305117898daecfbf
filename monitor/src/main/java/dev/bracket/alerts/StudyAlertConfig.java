package dev.bracket.alerts;

import dev.bracket.bands.BandMethod;

import java.util.List;
import java.util.Optional;

/**
 * One study's alert settings (the {@code alerts} section of a study in the YAML configuration,
 * read by {@link AlertConfigReader}).
 *
 * @param minPerArm  no per-row rule judges a row whose pooled arms hold fewer units than this
 * @param band       which band the per-row rules read
 * @param clearAfter consecutive evaluations without the condition that resolve a firing alert
 * @param rowRules  the per-row rules in force
 * @param stalled    the stream-stalled rule, if in force
 * @param quality    the data-quality rule, if in force
 * @param webhooks   receivers of this study's transitions
 */
public record StudyAlertConfig(long minPerArm, BandMethod band, int clearAfter, List<RowRule> rowRules,
                               Optional<StreamStalledRule> stalled, Optional<DataQualityRule> quality,
                               List<WebhookTarget> webhooks) {

    /** Common practice, no source: fewer than 30 units per arm makes normal-approximation bands unreliable. */
    public static final long DEFAULT_MIN_PER_ARM = 30;
    public static final int DEFAULT_CLEAR_AFTER = 3;

    public StudyAlertConfig {
        if (minPerArm < 1) {
            throw new IllegalArgumentException("alerts min-per-arm must be at least 1, was " + minPerArm);
        }
        if (clearAfter < 1) {
            throw new IllegalArgumentException("alerts clear-after must be at least 1, was " + clearAfter);
        }
        if (band == null || stalled == null || quality == null) {
            throw new IllegalArgumentException("alerts band, stalled and quality must be given (Optional.empty() for none)");
        }
        rowRules = List.copyOf(rowRules);
        webhooks = List.copyOf(webhooks);
        if (rowRules.stream().map(RowRule::rule).distinct().count() != rowRules.size()) {
            throw new IllegalArgumentException("each alert rule may appear once per study");
        }
    }

    /**
     * The settings of a study without an {@code alerts} section: sign-identified and
     * assumptions-refuted on the anytime band, no webhooks.
     */
    public static StudyAlertConfig defaults() {
        return new StudyAlertConfig(DEFAULT_MIN_PER_ARM, BandMethod.ANYTIME, DEFAULT_CLEAR_AFTER,
                List.of(new SignIdentifiedRule(0), new AssumptionsRefutedRule(0)), Optional.empty(), Optional.empty(),
                List.of());
    }
}
