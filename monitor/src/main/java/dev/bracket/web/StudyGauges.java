package dev.bracket.web;

import dev.bracket.bands.BandMethod;
import dev.bracket.bands.ConfidenceBand;
import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.BoundStatus;
import dev.bracket.bounds.IdentifiedInterval;
import dev.bracket.report.BoundRow;
import dev.bracket.report.store.LatestReports;
import dev.bracket.report.store.PublishedReport;
import io.micrometer.core.instrument.Gauge;
import io.micrometer.core.instrument.MeterRegistry;
import io.micrometer.core.instrument.Tags;

import java.util.List;
import java.util.Optional;
import java.util.Set;
import java.util.concurrent.ConcurrentHashMap;
import java.util.function.ToDoubleFunction;

/**
 * Prometheus gauges for the newest reports. Gauges read {@link LatestReports} when scraped, so
 * they always show the latest computed values; this class only registers a gauge the first
 * time its study, window and assumption set appear. Names (Prometheus form):
 * <ul>
 *   <li>{@code bracket_ate_lower}, {@code bracket_ate_upper}: ends of the identified
 *       interval (NaN when it is refuted or there are not enough data)</li>
 *   <li>{@code bracket_ate_sign}: +1 / -1 when the interval excludes zero, else 0</li>
 *   <li>{@code bracket_assumptions_refuted}: 1 when the assumptions contradict the data</li>
 *   <li>{@code bracket_ate_band_lower}, {@code bracket_ate_band_upper}: ends of each confidence band, with
 *       labels {@code method} ({@code anytime}, {@code fixed-horizon}) and {@code level} (NaN
 *       when the band is refuted or there are not enough data)</li>
 *   <li>{@code bracket_arm_units}: units with an observed outcome in the arm ({@code arm="treated"|"control"})</li>
 *   <li>{@code bracket_arm_pending_ratio}: share of the arm's exposed units whose outcome has not
 *       arrived (0 when no exposures are reported, NaN for an arm with no units)</li>
 *   <li>{@code bracket_arm_excess_outcomes}: outcomes beyond the arm's reported exposures, a
 *       data-quality finding (0 when no exposures are reported)</li>
 *   <li>{@code bracket_arm_lost_to_follow_up_ratio}: share of the arm's units lost to follow-up;
 *       only for windows whose reports count them (the cumulative window of a study with a
 *       follow-up horizon), NaN for an arm with no units</li>
 *   <li>{@code bracket_report_timestamp_seconds}: when the report was computed (Unix time)</li>
 * </ul>
 * Labels: {@code study}, {@code window}, and {@code assumptions} (comma-separated identifiers).
 */
public final class StudyGauges {

    private final MeterRegistry registry;
    private final LatestReports latest;
    private final Set<Object> registered = ConcurrentHashMap.newKeySet();

    public StudyGauges(MeterRegistry registry, LatestReports latest) {
        this.registry = registry;
        this.latest = latest;
    }

    /** Registers the gauges of any study, window or assumption set seen for the first time. */
    public void register(PublishedReport report) {
        String study = report.study();
        String window = report.window();
        if (registered.add(study + '\u0000' + window)) {
            Tags tags = Tags.of("study", study, "window", window);
            for (boolean treated : new boolean[] {true, false}) {
                Tags arm = tags.and("arm", treated ? "treated" : "control");
                gauge("bracket.arm.units", "Units observed in the arm", arm, null, r -> arm(r, treated).count(), study, window);
                gauge("bracket.arm.pending.ratio", "Share of the arm's units whose outcome has not arrived", arm, null, r -> {
                    ArmStatistics a = arm(r, treated);
                    return a.units() == 0 ? Double.NaN : (double) a.pending() / a.units();
                }, study, window);
                gauge("bracket.arm.excess.outcomes", "Outcomes beyond the arm's reported exposures (a data-quality finding)",
                        arm, null, r -> arm(r, treated).excessOutcomes(), study, window);
                if (report.lost() != null) {
                    gauge("bracket.arm.lost.to.follow.up.ratio", "Share of the arm's units lost to follow-up", arm, null,
                            r -> r.lost() == null ? Double.NaN : r.lost().share(treated, arm(r, treated)), study, window);
                }
            }
            gauge("bracket.report.timestamp", "When the report was computed, Unix time", tags, "seconds",
                    r -> r.computedAt().toEpochMilli() / 1000.0, study, window);
        }
        for (BoundRow row : report.report().rows()) {
            AssumptionSet set = row.assumptions();
            if (registered.add(new ReportHistory.SeriesKey(study, window, set))) {
                Tags tags = Tags.of("study", study, "window", window, "assumptions", set.toString());
                intervalGauge("bracket.ate.lower", "Lower end of the identified interval of the ATE", tags,
                        IdentifiedInterval::lower, study, window, set);
                intervalGauge("bracket.ate.upper", "Upper end of the identified interval of the ATE", tags,
                        IdentifiedInterval::upper, study, window, set);
                intervalGauge("bracket.ate.sign", "+1 or -1 when the interval excludes zero, else 0", tags,
                        IdentifiedInterval::identifiedSign, study, window, set);
                intervalGauge("bracket.assumptions.refuted", "1 when the assumptions contradict the data", tags,
                        iv -> iv.status() == BoundStatus.REFUTED ? 1 : 0, study, window, set);
            }
            for (ConfidenceBand band : row.bands()) {
                BandMethod method = band.method();
                double level = band.level();
                if (registered.add(List.of(study, window, set, method, level))) {
                    Tags tags = Tags.of("study", study, "window", window, "assumptions", set.toString(),
                            "method", method.id(), "level", Double.toString(level));
                    gauge("bracket.ate.band.lower", "Lower end of the confidence band around the interval", tags, null,
                            r -> band(r, set, method, level).map(ConfidenceBand::lower).orElse(Double.NaN), study, window);
                    gauge("bracket.ate.band.upper", "Upper end of the confidence band around the interval", tags, null,
                            r -> band(r, set, method, level).map(ConfidenceBand::upper).orElse(Double.NaN), study, window);
                }
            }
        }
    }

    private static ArmStatistics arm(PublishedReport report, boolean treated) {
        return treated ? report.report().pooled().treated() : report.report().pooled().control();
    }

    private static Optional<ConfidenceBand> band(PublishedReport report, AssumptionSet set, BandMethod method, double level) {
        return report.report().rows().stream().filter(r -> r.assumptions().equals(set)).findFirst()
                .flatMap(row -> row.bands().stream().filter(b -> b.method() == method && b.level() == level).findFirst());
    }

    private void intervalGauge(String name, String help, Tags tags, ToDoubleFunction<IdentifiedInterval> value,
                               String study, String window, AssumptionSet set) {
        gauge(name, help, tags, null, r -> interval(r, set).map(value::applyAsDouble).orElse(Double.NaN), study, window);
    }

    private void gauge(String name, String help, Tags tags, String unit, ToDoubleFunction<PublishedReport> value,
                       String study, String window) {
        Gauge.builder(name, latest, l -> l.get(study, window).map(value::applyAsDouble).orElse(Double.NaN))
                .description(help)
                .tags(tags)
                .baseUnit(unit)
                .register(registry);
    }

    private static Optional<IdentifiedInterval> interval(PublishedReport report, AssumptionSet set) {
        return report.report().rows().stream().filter(r -> r.assumptions().equals(set)).findFirst().map(BoundRow::interval);
    }
}
