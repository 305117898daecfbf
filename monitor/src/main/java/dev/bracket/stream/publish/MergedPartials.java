package dev.bracket.stream.publish;

import dev.bracket.stream.ingest.LateKey;
import dev.bracket.stream.ingest.PaneKey;
import dev.bracket.stream.ingest.SourcePartition;
import dev.bracket.stream.ingest.SourceProgress;
import dev.bracket.stream.transaction.PartialsCodec;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.StudyCells;

import java.util.HashMap;
import java.util.HashSet;
import java.util.Map;
import java.util.Set;
import java.util.SortedSet;
import java.util.TreeSet;
import java.util.function.LongPredicate;

/**
 * The latest cumulative statistics of every source partition for every pane, as read from the
 * partials topic (or handed over by {@code replay}), and their sum. A newer record for a
 * (source, pane) replaces the older one, so a source's contribution is counted once however
 * often it was written; totals are the sum over sources ({@link ObservedArms#merge}).
 * Single-threaded.
 */
public final class MergedPartials implements PartialsCodec.Sink {

    private final Map<String, Map<PaneKey, PaneSources>> byStudy = new HashMap<>();
    private final Map<SourcePartition, SourceProgress> progress = new HashMap<>();
    private final Set<String> changed = new HashSet<>();
    private boolean watermarkChanged;

    @Override
    public void pane(SourcePartition source, PaneKey key, ObservedArms arms) {
        Map<PaneKey, PaneSources> panes = byStudy.computeIfAbsent(key.study(), k -> new HashMap<>());
        PaneSources sources = panes.get(key);
        if (arms == null) {
            if (sources != null && sources.remove(source)) {
                panes.remove(key);
            }
        } else if (sources == null) {
            panes.put(key, new PaneSources(source, arms));
        } else {
            sources.put(source, arms);
        }
        changed.add(key.study());
    }

    @Override
    public void progress(SourcePartition source, SourceProgress p) {
        SourceProgress before = progress.put(source, p);
        long oldTime = before == null ? Long.MIN_VALUE : before.streamTime();
        if (p.streamTime() != oldTime) {
            watermarkChanged = true;
        }
        Map<LateKey, Long> old = before == null ? Map.of() : before.late();
        p.late().forEach((k, n) -> {
            if (!n.equals(old.get(k))) {
                changed.add(k.study());
            }
        });
    }

    /** Studies whose numbers changed since the last call, and whether event time moved; clears both. */
    public Changes takeChanges() {
        Changes c = new Changes(Set.copyOf(changed), watermarkChanged);
        changed.clear();
        watermarkChanged = false;
        return c;
    }

    /** What {@link #takeChanges} found. */
    public record Changes(Set<String> studies, boolean watermarkMoved) {
    }

    /** The largest event time any source has seen; {@link Long#MIN_VALUE} before any event. */
    public long watermark() {
        return progress.values().stream().mapToLong(SourceProgress::streamTime).max().orElse(Long.MIN_VALUE);
    }

    /** Late events of a study and window, summed over sources. */
    public long late(String study, String window) {
        LateKey key = new LateKey(study, window);
        return progress.values().stream().mapToLong(p -> p.late().getOrDefault(key, 0L)).sum();
    }

    /** Start times of the study's panes of one window, in order. */
    public SortedSet<Long> paneStarts(String study, String window) {
        SortedSet<Long> out = new TreeSet<>();
        for (PaneKey k : byStudy.getOrDefault(study, Map.of()).keySet()) {
            if (k.window().equals(window)) {
                out.add(k.paneStart());
            }
        }
        return out;
    }

    /** The study's panes of one window whose pane start passes {@code panes}, summed over sources. */
    public StudyCells cells(String study, String window, LongPredicate panes) {
        StudyCells.Builder out = new StudyCells.Builder();
        for (Map.Entry<PaneKey, PaneSources> e : byStudy.getOrDefault(study, Map.of()).entrySet()) {
            PaneKey k = e.getKey();
            if (k.window().equals(window) && panes.test(k.paneStart())) {
                out.add(k.stratum(), k.level(), e.getValue().sum());
            }
        }
        return out.build();
    }
}
