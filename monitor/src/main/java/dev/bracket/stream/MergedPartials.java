package dev.bracket.stream;

import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.StudyCells;

import java.util.HashMap;
import java.util.HashSet;
import java.util.Map;
import java.util.Set;
import java.util.function.LongPredicate;

/**
 * The latest cumulative statistics of every source partition for every cell, as read from the
 * partials topic (or handed over by {@code replay}), and their sum. A newer record for a
 * (source, cell) replaces the older one, so a source's contribution is counted once however
 * often it was written; totals are the sum over sources ({@link ObservedArms#merge}).
 * Single-threaded.
 */
public final class MergedPartials implements PartialsCodec.Sink {

    private final Map<String, Map<CellKey, Map<SourcePartition, ObservedArms>>> byStudy = new HashMap<>();
    private final Map<SourcePartition, SourceProgress> progress = new HashMap<>();
    private final Set<String> changed = new HashSet<>();
    private boolean watermarkChanged;

    @Override
    public void cell(SourcePartition source, CellKey key, ObservedArms arms) {
        Map<CellKey, Map<SourcePartition, ObservedArms>> cells = byStudy.computeIfAbsent(key.study(), k -> new HashMap<>());
        if (arms == null) {
            Map<SourcePartition, ObservedArms> sources = cells.get(key);
            if (sources != null && sources.remove(source) != null && sources.isEmpty()) {
                cells.remove(key);
            }
        } else {
            cells.computeIfAbsent(key, k -> new HashMap<>()).put(source, arms);
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

    /** The study's cells of one window whose pane start passes {@code panes}, summed over sources. */
    public StudyCells cells(String study, String window, LongPredicate panes) {
        StudyCells.Builder out = new StudyCells.Builder();
        for (Map.Entry<CellKey, Map<SourcePartition, ObservedArms>> e : byStudy.getOrDefault(study, Map.of()).entrySet()) {
            CellKey k = e.getKey();
            if (k.window().equals(window) && panes.test(k.paneStart())) {
                ObservedArms sum = ObservedArms.empty();
                for (ObservedArms a : e.getValue().values()) {
                    sum = sum.merge(a);
                }
                out.add(k.stratum(), k.level(), sum);
            }
        }
        return out.build();
    }
}
