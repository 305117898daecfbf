package dev.bracket.stream.ingest;

import dev.bracket.bounds.ObservedArms;
import dev.bracket.config.StudyConfig;
import dev.bracket.config.WindowSpec;

import java.time.Duration;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.Iterator;
import java.util.List;
import java.util.Map;
import java.util.function.BiConsumer;

/**
 * The panes of one source partition: cumulative statistics per (study, stratum, instrument
 * level, window, pane), the partition's stream time (largest event time seen) and its late
 * counts. One writer, no locking.
 *
 * <p>An event is late for a windowed (tumbling or sliding) window when every window containing
 * it has closed: {@code paneStart + size + grace <= streamTime}. It then still counts in the
 * cumulative window and in windows that are open, and is counted as late for the closed one.
 * Closed panes can no longer change; {@link #evictClosed} drops them.
 */
public final class PartitionState {

    /** Slots of the pane cache (a power of two). */
    private static final int CACHE_SLOTS = 64;

    private final SourcePartition source;
    private final WindowSpec[] windows;
    private final long[] paneMillis;
    private final long[] sizeMillis;
    private final boolean[] cumulative;
    private final String[] windowNames;
    /** Per window, the start of the last event's pane. */
    private final long[] lastPane;
    private final long graceMillis;
    private final BiConsumer<StudyConfig, WindowSpec> onLate;
    private final Map<PaneKey, PaneAccumulator> panes = new HashMap<>();
    private final Map<LateKey, Long> late = new HashMap<>();
    private final Map<String, StudyTraffic> traffic = new HashMap<>();
    private long unattributed;
    // A direct-mapped cache in front of the pane map. Events repeat a few panes, and their
    // strings are the parser's canonical instances, so comparing by identity finds most panes
    // without making a key and looking it up. A miss (or an equal string that is another
    // instance) falls through to the map; anything that removes or replaces panes clears it.
    private final PaneKey[] cachedKeys = new PaneKey[CACHE_SLOTS];
    private final PaneAccumulator[] cachedPanes = new PaneAccumulator[CACHE_SLOTS];
    private long streamTime = Long.MIN_VALUE;
    private boolean progressDirty;

    /**
     * @param onLate told of each late (event, window) pair, e.g. to count it in a metric
     */
    public PartitionState(SourcePartition source, List<WindowSpec> windows, long graceMillis,
                          BiConsumer<StudyConfig, WindowSpec> onLate) {
        this.source = source;
        this.windows = windows.toArray(new WindowSpec[0]);
        this.paneMillis = new long[this.windows.length];
        this.sizeMillis = new long[this.windows.length];
        this.cumulative = new boolean[this.windows.length];
        this.windowNames = new String[this.windows.length];
        this.lastPane = new long[this.windows.length];
        for (int i = 0; i < this.windows.length; i++) {
            paneMillis[i] = this.windows[i].paneMillis();
            sizeMillis[i] = this.windows[i].size().toMillis();
            cumulative[i] = this.windows[i].kind() == WindowSpec.Kind.CUMULATIVE;
            windowNames[i] = this.windows[i].name();
            lastPane[i] = WindowSpec.paneStart(0, paneMillis[i]);
        }
        this.graceMillis = graceMillis;
        this.onLate = onLate;
    }

    public SourcePartition source() {
        return source;
    }

    /**
     * Folds a usable event into its panes, one per window: an exposure counts a unit in its arm,
     * an outcome adds to the arm's statistics. An outcome carrying its exposure time is placed in
     * the panes of that time (the unit's window), otherwise in those of its own time.
     */
    public void add(ParsedEvent e) {
        if (e.time() > streamTime) {
            streamTime = e.time(); // stream time follows the events' own times, whatever window they count in
            progressDirty = true;
        }
        long t = e.exposedTime() != Long.MIN_VALUE ? e.exposedTime() : e.time();
        String study = e.study().id();
        String stratum = e.stratum();
        String level = e.instrument();
        int cell = (study.hashCode() * 31 + stratum.hashCode()) * 31 + level.hashCode();
        for (int w = 0; w < windows.length; w++) {
            long pane = paneStart(w, t);
            if (!cumulative[w] && isClosed(sizeMillis[w], pane)) {
                late.merge(new LateKey(study, windowNames[w]), 1L, Long::sum);
                progressDirty = true;
                onLate.accept(e.study(), windows[w]);
                continue;
            }
            fold(pane(cell, study, stratum, level, windowNames[w], pane), e);
        }
        Duration horizon = e.study().followUp();
        if (horizon != null && (e.isExposure() || e.exposedTime() != Long.MIN_VALUE)) {
            // Follow-up panes: by exposure-time bucket, never late, never evicted (see FollowUpPanes).
            fold(pane(cell, study, stratum, level, FollowUpPanes.WINDOW,
                    WindowSpec.paneStart(t, FollowUpPanes.bucketMillis(horizon))), e);
        }
    }

    /**
     * {@link WindowSpec#paneStart} of window {@code w}, remembering the last pane: events come
     * mostly in time order, and the division it saves is a good part of a fold.
     */
    private long paneStart(int w, long t) {
        long size = paneMillis[w];
        if (size == 0) {
            return 0; // the cumulative window
        }
        long start = lastPane[w];
        long into = t - start; // negative when it overflows: then computed below
        if (t >= start && into >= 0 && into < size) {
            return start;
        }
        start = WindowSpec.paneStart(t, size);
        lastPane[w] = start;
        return start;
    }

    private static void fold(PaneAccumulator pane, ParsedEvent e) {
        if (e.isExposure()) {
            pane.addExposure(e.treated());
        } else {
            pane.add(e.treated(), e.outcome());
        }
    }

    /** @param cell the hash of study, stratum and level, computed once per event for all its panes */
    private PaneAccumulator pane(int cell, String study, String stratum, String level, String window, long paneStart) {
        int h = (cell * 31 + window.hashCode()) * 31 + Long.hashCode(paneStart);
        int slot = (h ^ (h >>> 16)) & (CACHE_SLOTS - 1);
        PaneKey k = cachedKeys[slot];
        if (k != null && k.paneStart() == paneStart && k.study() == study && k.stratum() == stratum && k.level() == level
                && k.window() == window) {
            return cachedPanes[slot];
        }
        PaneKey key = new PaneKey(study, stratum, level, window, paneStart);
        PaneAccumulator pane = panes.get(key);
        if (pane == null) {
            pane = new PaneAccumulator();
            panes.put(key, pane);
        }
        cachedKeys[slot] = key;
        cachedPanes[slot] = pane;
        return pane;
    }

    private void clearCache() {
        Arrays.fill(cachedKeys, null);
        Arrays.fill(cachedPanes, null);
    }

    private boolean isClosed(long sizeMillis, long paneStart) {
        // Saturating: paneStart + size + grace may exceed Long.MAX_VALUE for far-future times.
        long closesAt = paneStart + sizeMillis;
        closesAt = closesAt > Long.MAX_VALUE - graceMillis ? Long.MAX_VALUE : closesAt + graceMillis;
        return closesAt <= streamTime;
    }

    /**
     * Removes panes whose panes have closed and returns their keys (for tombstones in the
     * partials topic). Closed panes lie before every window a report can still be asked for.
     */
    public List<PaneKey> evictClosed() {
        List<PaneKey> closed = new ArrayList<>();
        Map<String, WindowSpec> byName = new HashMap<>();
        for (WindowSpec w : windows) {
            byName.put(w.name(), w);
        }
        for (Iterator<Map.Entry<PaneKey, PaneAccumulator>> it = panes.entrySet().iterator(); it.hasNext(); ) {
            PaneKey key = it.next().getKey();
            WindowSpec w = byName.get(key.window());
            if (w != null && w.kind() != WindowSpec.Kind.CUMULATIVE && isClosed(w.size().toMillis(), key.paneStart())) {
                closed.add(key);
                it.remove();
            }
        }
        if (!closed.isEmpty()) {
            clearCache();
        }
        return closed;
    }

    /** Calls {@code sink} with every pane changed since {@link #markClean}. */
    public void forEachDirty(BiConsumer<PaneKey, ObservedArms> sink) {
        panes.forEach((k, c) -> {
            if (c.isDirty()) {
                sink.accept(k, c.snapshot());
            }
        });
    }

    public boolean progressChanged() {
        return progressDirty;
    }

    /** Marks everything as written. */
    public void markClean() {
        panes.values().forEach(PaneAccumulator::markClean);
        progressDirty = false;
    }

    /** Every pane's current statistics. */
    public Map<PaneKey, ObservedArms> panes() {
        Map<PaneKey, ObservedArms> out = new HashMap<>();
        panes.forEach((k, c) -> out.put(k, c.snapshot()));
        return out;
    }

    /** The largest event time seen (Long.MIN_VALUE: none yet). */
    public long streamTime() {
        return streamTime;
    }

    /** Adds a batch of a study's events to its traffic counts (once per poll, not per event). */
    public void countTraffic(String study, long accepted, long rejected, long outOfRange) {
        traffic.merge(study, StudyTraffic.NONE.plus(accepted, rejected, outOfRange),
                (a, b) -> a.plus(b.accepted(), b.rejected(), b.outOfRange()));
        progressDirty = true;
    }

    /** Adds rejected records whose study could not be read (once per poll, not per record). */
    public void countUnattributed(long rejected) {
        unattributed += rejected;
        progressDirty = true;
    }

    public SourceProgress progress() {
        return new SourceProgress(streamTime, late, traffic, unattributed);
    }

    /** Puts back a pane read from the partials topic (not marked as changed). */
    public void restorePane(PaneKey key, ObservedArms arms) {
        PaneAccumulator pane = new PaneAccumulator();
        pane.set(arms);
        panes.put(key, pane);
        clearCache();
    }

    /** Puts back the stream time, late counts and traffic read from the partials topic. */
    public void restoreProgress(SourceProgress progress) {
        streamTime = progress.streamTime();
        late.clear();
        late.putAll(progress.late());
        traffic.clear();
        traffic.putAll(progress.traffic());
        unattributed = progress.unattributed();
    }
}
