package dev.bracket.stream.transaction;

import dev.bracket.bounds.ObservedArms;
import dev.bracket.stream.ingest.PaneKey;
import dev.bracket.stream.ingest.SeenIds;
import dev.bracket.stream.ingest.SourcePartition;
import dev.bracket.stream.ingest.SourceProgress;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Passes on the records read from one partials partition, except panes and seen event ids that do not belong there
 * ({@link PartialsCodec#partitionFor(String, int)}): a partials topic written by a version that
 * placed records by source partition, or whose partition count was changed since. Such panes
 * would be counted by the wrong owner, or twice, so they are dropped with a warning naming the fix.
 */
public final class PlacementCheck implements PartialsCodec.Sink {

    private static final Logger LOG = LoggerFactory.getLogger(PlacementCheck.class);

    private final String topic;
    private final int partition;
    private final int partitions;
    private final PartialsCodec.Sink next;
    private long misplaced;

    public PlacementCheck(String topic, int partition, int partitions, PartialsCodec.Sink next) {
        this.topic = topic;
        this.partition = partition;
        this.partitions = partitions;
        this.next = next;
    }

    @Override
    public void pane(SourcePartition source, PaneKey key, ObservedArms arms) {
        if (PartialsCodec.partitionFor(key.study(), partitions) == partition) {
            next.pane(source, key, arms);
        } else if (misplaced++ == 0) {
            LOG.warn("partials topic '{}' partition {} holds panes of study '{}', which belong in partition {} of {}:"
                    + " the topic was written by an older version or its partition count changed. These panes are ignored;"
                    + " give the monitor a new partials topic and a new group (see README, Scaling out)",
                    topic, partition, key.study(), PartialsCodec.partitionFor(key.study(), partitions), partitions);
        }
    }

    @Override
    public void progress(SourcePartition source, SourceProgress progress) {
        next.progress(source, progress);
    }

    /** Seen ids sit with their study's panes; a misplaced one is ignored like a misplaced pane (its id may count again). */
    @Override
    public void seen(SourcePartition source, SeenIds.Key key, Long time) {
        if (PartialsCodec.partitionFor(key.study(), partitions) == partition) {
            next.seen(source, key, time);
        }
    }
}
