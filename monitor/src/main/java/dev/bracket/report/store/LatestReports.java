package dev.bracket.report.store;

import java.util.Comparator;
import java.util.List;
import java.util.Optional;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.ConcurrentMap;

/**
 * The newest {@link PublishedReport} per (study, window), written by the bound updater and read
 * by the HTTP API and the terminal view. Thread-safe; readers see whole reports only.
 */
public final class LatestReports {

    private final ConcurrentMap<String, ConcurrentMap<String, PublishedReport>> byStudy = new ConcurrentHashMap<>();

    public void put(PublishedReport report) {
        byStudy.computeIfAbsent(report.study(), k -> new ConcurrentHashMap<>()).put(report.window(), report);
    }

    /** Drops a study's reports (another instance publishes them now). */
    public void forget(String study) {
        byStudy.remove(study);
    }

    /** The study's reports, one per window, in window-name order. */
    public List<PublishedReport> study(String study) {
        return byStudy.getOrDefault(study, new ConcurrentHashMap<>()).values().stream()
                .sorted(Comparator.comparing(PublishedReport::window)).toList();
    }

    public Optional<PublishedReport> get(String study, String window) {
        return Optional.ofNullable(byStudy.getOrDefault(study, new ConcurrentHashMap<>()).get(window));
    }

    /** Study identifiers with at least one report, sorted. */
    public List<String> studies() {
        return byStudy.keySet().stream().sorted().toList();
    }
}
