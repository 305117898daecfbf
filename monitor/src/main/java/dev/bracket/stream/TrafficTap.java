package dev.bracket.stream;

import dev.bracket.bounds.ObservedArms;

import java.util.HashMap;
import java.util.Map;
import java.util.Set;

/**
 * Passes partials records on and turns the cumulative traffic counts of progress records into
 * increments for the studies of one partials partition. While the partition is being read up
 * to where its previous owner left off, increments only move the baseline: those events are
 * history, not news.
 */
final class TrafficTap implements PartialsCodec.Sink {

    private final PartialsCodec.Sink next;
    private final Set<String> studies;
    private final StudyEventCounts counts;
    private final Map<SourcePartition, Map<String, StudyTraffic>> seen = new HashMap<>();
    private boolean live;

    TrafficTap(PartialsCodec.Sink next, Set<String> studies, StudyEventCounts counts) {
        this.next = next;
        this.studies = studies;
        this.counts = counts;
    }

    /** From now on increments are passed on. */
    void goLive() {
        live = true;
    }

    @Override
    public void cell(SourcePartition source, CellKey key, ObservedArms arms) {
        next.cell(source, key, arms);
    }

    @Override
    public void progress(SourcePartition source, SourceProgress progress) {
        Map<String, StudyTraffic> before = seen.computeIfAbsent(source, s -> new HashMap<>());
        for (String study : studies) {
            StudyTraffic now = progress.traffic().get(study);
            if (now == null) {
                continue;
            }
            StudyTraffic was = before.getOrDefault(study, StudyTraffic.NONE);
            long accepted = Math.max(0, now.accepted() - was.accepted());
            long rejected = Math.max(0, now.rejected() - was.rejected());
            long outOfRange = Math.min(rejected, Math.max(0, now.outOfRange() - was.outOfRange()));
            before.put(study, now);
            if (live && accepted + rejected > 0) {
                counts.counted(study, accepted, rejected, outOfRange);
            }
        }
        next.progress(source, progress);
    }
}
