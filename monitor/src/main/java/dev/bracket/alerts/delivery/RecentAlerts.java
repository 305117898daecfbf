package dev.bracket.alerts.delivery;

import dev.bracket.alerts.AlertTransition;
import java.util.ArrayDeque;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;

/**
 * The newest transitions in memory, for {@code GET /api/alerts}. Bounded: beyond the capacity
 * the oldest are forgotten (the alerts topic keeps the record). Thread-safe.
 */
public final class RecentAlerts implements AlertSink {

    public static final int DEFAULT_CAPACITY = 200;

    private final int capacity;
    private final ArrayDeque<AlertTransition> newestLast = new ArrayDeque<>();

    public RecentAlerts(int capacity) {
        if (capacity < 1) {
            throw new IllegalArgumentException("recent alerts capacity must be at least 1, was " + capacity);
        }
        this.capacity = capacity;
    }

    @Override
    public String name() {
        return "recent";
    }

    @Override
    public synchronized void accept(AlertTransition t) {
        if (newestLast.size() == capacity) {
            newestLast.removeFirst();
        }
        newestLast.addLast(t);
    }

    /** The remembered transitions, newest first. */
    public synchronized List<AlertTransition> newestFirst() {
        List<AlertTransition> out = new ArrayList<>(newestLast);
        Collections.reverse(out);
        return out;
    }
}
