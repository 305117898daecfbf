package dev.bracket.app;

import dev.bracket.stream.transaction.StreamAggregator;
import dev.bracket.stream.publish.BoundUpdater;
import dev.bracket.config.BracketConfig;

import java.time.Duration;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * The monitor's liveness and readiness, as documents for {@code GET /health/live} and
 * {@code GET /health/ready}: {@code {"status": "ok"|"failing", "failing": [names], "checks":
 * {name: {"ok", "detail"}}}}.
 *
 * <p>Live: every aggregation member and the bound updater run. Ready: live, and Kafka answers,
 * every member has its share of partitions from the group (possibly none: more members than
 * partitions), and every member committed (or found nothing to commit) within
 * {@link #commitBound} — the larger of 30 s and ten commit intervals, a rule of thumb (common
 * practice, no source) that tolerates a slow transaction but not a stuck one.
 */
final class HealthChecks {

    private final List<StreamAggregator> aggregators;
    private final BoundUpdater updater;
    private final List<Thread> threads;
    private final BrokerProbe probe;
    private final long commitBoundMillis;

    HealthChecks(List<StreamAggregator> aggregators, BoundUpdater updater, List<Thread> threads, BrokerProbe probe, BracketConfig config) {
        this.aggregators = aggregators;
        this.updater = updater;
        this.threads = threads;
        this.probe = probe;
        this.commitBoundMillis = commitBound(config.commitInterval()).toMillis();
    }

    static Duration commitBound(Duration commitInterval) {
        Duration tenIntervals = commitInterval.multipliedBy(10);
        return tenIntervals.compareTo(Duration.ofSeconds(30)) > 0 ? tenIntervals : Duration.ofSeconds(30);
    }

    Map<String, Object> liveness() {
        Map<String, Map<String, Object>> checks = new LinkedHashMap<>();
        checks.put("threads", threads());
        return document(checks);
    }

    Map<String, Object> readiness() {
        Map<String, Map<String, Object>> checks = new LinkedHashMap<>();
        checks.put("threads", threads());
        boolean reachable = probe.reachable();
        checks.put("broker", check(reachable, reachable ? "Kafka answers" : "Kafka does not answer within 2 s"));
        long now = System.currentTimeMillis();
        List<String> waiting = new ArrayList<>();
        List<String> stale = new ArrayList<>();
        int partitions = 0;
        for (int i = 0; i < aggregators.size(); i++) {
            StreamAggregator.Status s = aggregators.get(i).status();
            partitions += s.partitions();
            if (!s.assigned()) {
                waiting.add("member " + i + " for " + (now - s.unassignedSince()) / 1000 + " s");
            }
            if (now - s.upToDateMillis() > commitBoundMillis) {
                stale.add("member " + i + ": " + (now - s.upToDateMillis()) / 1000 + " s ago");
            }
        }
        checks.put("partitions", check(waiting.isEmpty(), waiting.isEmpty()
                ? partitions + " input partition(s) assigned" : "waiting for the group to assign partitions: " + waiting));
        checks.put("commit", check(stale.isEmpty(), stale.isEmpty()
                ? "every member committed within " + commitBoundMillis / 1000 + " s"
                : "no commit within " + commitBoundMillis / 1000 + " s: " + stale));
        return document(checks);
    }

    /** Seconds since the member furthest behind was last up to date. */
    double oldestCommitAgeSeconds() {
        long oldest = Long.MAX_VALUE;
        for (StreamAggregator a : aggregators) {
            oldest = Math.min(oldest, a.status().upToDateMillis());
        }
        return oldest == Long.MAX_VALUE ? Double.NaN : (System.currentTimeMillis() - oldest) / 1000.0;
    }

    /** Seconds since the last published report; NaN before the first. */
    double reportAgeSeconds() {
        long last = updater.lastReportMillis();
        return last == 0 ? Double.NaN : (System.currentTimeMillis() - last) / 1000.0;
    }

    private Map<String, Object> threads() {
        List<String> stopped = new ArrayList<>();
        for (Thread t : threads) {
            if (!t.isAlive()) {
                stopped.add(t.getName());
            }
        }
        return check(stopped.isEmpty(), stopped.isEmpty() ? threads.size() + " thread(s) running" : "stopped: " + stopped);
    }

    private static Map<String, Object> check(boolean ok, String detail) {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("ok", ok);
        m.put("detail", detail);
        return m;
    }

    private static Map<String, Object> document(Map<String, Map<String, Object>> checks) {
        List<String> failing = new ArrayList<>();
        checks.forEach((name, c) -> {
            if (!Boolean.TRUE.equals(c.get("ok"))) {
                failing.add(name);
            }
        });
        Map<String, Object> doc = new LinkedHashMap<>();
        doc.put("status", failing.isEmpty() ? "ok" : "failing");
        doc.put("failing", failing);
        doc.put("checks", checks);
        return doc;
    }
}
