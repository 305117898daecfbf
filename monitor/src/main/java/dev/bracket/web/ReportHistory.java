package dev.bracket.web;

import dev.bracket.bands.BandMethod;
import dev.bracket.bands.ConfidenceBand;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.BoundStatus;
import dev.bracket.report.BoundRow;
import dev.bracket.report.store.PublishedReport;

import java.util.ArrayDeque;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * The recent past of every interval, for the chart on the web page: per (study, window,
 * assumption set) a series of the interval's ends, and its confidence bands' ends, at each
 * report time. Bounded: a series keeps
 * its newest {@code capacity} points and forgets older ones, so memory stays flat however long
 * the monitor runs. Thread-safe.
 */
public final class ReportHistory {

    /** Which interval a series follows. */
    public record SeriesKey(String study, String window, AssumptionSet assumptions) {
    }

    /**
     * One report's interval and confidence bands. Ends are NaN when their status is not identified.
     *
     * @param epochMillis when the report was computed
     * @param bands       the row's bands, in the report's order (empty when none were computed)
     */
    public record Point(long epochMillis, double lower, double upper, BoundStatus status, List<BandEnds> bands) {
        public Point {
            bands = List.copyOf(bands);
        }
    }

    /** The ends of one confidence band at one report; NaN unless the band is identified. */
    public record BandEnds(BandMethod method, double level, double lower, double upper) {
        static BandEnds of(ConfidenceBand band) {
            return new BandEnds(band.method(), band.level(), band.lower(), band.upper());
        }
    }

    /** A copy of one series, oldest point first. */
    public record Series(SeriesKey key, List<Point> points) {
    }

    private final int capacity;
    /** Insertion-ordered so series appear in the order the reports list them. */
    private final Map<SeriesKey, ArrayDeque<Point>> series = new LinkedHashMap<>();
    private final Map<String, Long> lastRecorded = new HashMap<>();

    public ReportHistory(int capacity) {
        if (capacity < 2) {
            throw new IllegalArgumentException("history capacity must be at least 2 points, was " + capacity);
        }
        this.capacity = capacity;
    }

    /**
     * Adds the report's intervals, once per computed report: a report that is not newer than
     * the last one recorded for its study and window is ignored, so polling may repeat.
     *
     * @return whether anything was added
     */
    public synchronized boolean record(PublishedReport published) {
        long at = published.computedAt().toEpochMilli();
        String reportKey = published.study() + '\u0000' + published.window();
        Long last = lastRecorded.get(reportKey);
        if (last != null && at <= last) {
            return false;
        }
        lastRecorded.put(reportKey, at);
        for (BoundRow row : published.report().rows()) {
            SeriesKey key = new SeriesKey(published.study(), published.window(), row.assumptions());
            ArrayDeque<Point> points = series.computeIfAbsent(key, k -> new ArrayDeque<>());
            if (points.size() == capacity) {
                points.removeFirst();
            }
            points.addLast(new Point(at, row.interval().lower(), row.interval().upper(), row.interval().status(),
                    row.bands().stream().map(BandEnds::of).toList()));
        }
        return true;
    }

    /** The study's series, windows and assumption sets in the order first seen. */
    public synchronized List<Series> study(String study) {
        List<Series> out = new ArrayList<>();
        series.forEach((key, points) -> {
            if (key.study().equals(study)) {
                out.add(new Series(key, List.copyOf(points)));
            }
        });
        return out;
    }

    public int capacity() {
        return capacity;
    }
}
