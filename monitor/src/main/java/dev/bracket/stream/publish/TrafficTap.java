package dev.bracket.stream.publish;

import dev.bracket.bounds.ObservedArms;
import dev.bracket.stream.ingest.PaneKey;
import dev.bracket.stream.ingest.SourcePartition;
import dev.bracket.stream.ingest.SourceProgress;
import dev.bracket.stream.ingest.StudyEventCounts;
import dev.bracket.stream.ingest.StudyTraffic;
import dev.bracket.stream.transaction.PartialsCodec;

import java.util.HashMap;
import java.util.Map;
import java.util.Set;

/**
 * Passes partials records on and turns the cumulative traffic counts of progress records (per
 * study, and of records without a readable study) into increments for the studies of one
 * partials partition. While the partition is being read up
 * to where its previous owner left off, increments only move the baseline: those events are
 * history, not news.
 */
final class TrafficTap implements PartialsCodec.Sink {

    private final PartialsCodec.Sink next;
    private final Set<String> studies;
    private final StudyEventCounts counts;
    private final Map<SourcePartition, Map<String, StudyTraffic>> seen = new HashMap<>();
    private final Map<SourcePartition, Long> unattributedSeen = new HashMap<>();
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
    public void pane(SourcePartition source, PaneKey key, ObservedArms arms) {
        next.pane(source, key, arms);
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
        // Records without a readable study count against every study; each study lives in one
        // partials partition, so telling this partition's studies counts each record once per study.
        Long wasUnattributed = unattributedSeen.put(source, progress.unattributed());
        long unattributed = Math.max(0, progress.unattributed() - (wasUnattributed == null ? 0 : wasUnattributed));
        if (live && unattributed > 0) {
            studies.forEach(study -> counts.unattributed(study, unattributed));
        }
        next.progress(source, progress);
    }
}
