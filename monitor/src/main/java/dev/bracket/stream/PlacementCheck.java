package dev.bracket.stream;

import dev.bracket.bounds.ObservedArms;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Passes on the records read from one partials partition, except cells that do not belong there
 * ({@link PartialsCodec#partitionFor(String, int)}): a partials topic written by a version that
 * placed records by source partition, or whose partition count was changed since. Such cells
 * would be counted by the wrong owner, or twice, so they are dropped with a warning naming the fix.
 */
final class PlacementCheck implements PartialsCodec.Sink {

    private static final Logger LOG = LoggerFactory.getLogger(PlacementCheck.class);

    private final String topic;
    private final int partition;
    private final int partitions;
    private final PartialsCodec.Sink next;
    private long misplaced;

    PlacementCheck(String topic, int partition, int partitions, PartialsCodec.Sink next) {
        this.topic = topic;
        this.partition = partition;
        this.partitions = partitions;
        this.next = next;
    }

    @Override
    public void cell(SourcePartition source, CellKey key, ObservedArms arms) {
        if (PartialsCodec.partitionFor(key.study(), partitions) == partition) {
            next.cell(source, key, arms);
        } else if (misplaced++ == 0) {
            LOG.warn("partials topic '{}' partition {} holds cells of study '{}', which belong in partition {} of {}:"
                    + " the topic was written by an older version or its partition count changed. These cells are ignored;"
                    + " give the monitor a new partials topic and a new group (see README, Scaling out)",
                    topic, partition, key.study(), PartialsCodec.partitionFor(key.study(), partitions), partitions);
        }
    }

    @Override
    public void progress(SourcePartition source, SourceProgress progress) {
        next.progress(source, progress);
    }
}
