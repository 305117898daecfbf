package dev.bracket.stream.transaction;

import dev.bracket.stream.ingest.SeenIds;
import dev.bracket.stream.ingest.PaneKey;
import dev.bracket.stream.ingest.SourcePartition;
import dev.bracket.stream.ingest.SourceProgress;
import dev.bracket.bounds.ObservedArms;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.admin.ListOffsetsOptions;
import org.apache.kafka.clients.admin.ListOffsetsResult;
import org.apache.kafka.clients.admin.OffsetSpec;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.common.IsolationLevel;
import org.apache.kafka.common.TopicPartition;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

import java.time.Duration;
import java.util.Collection;
import java.util.HashMap;
import java.util.HashSet;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.concurrent.ExecutionException;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.TimeoutException;

/**
 * Rebuilds source partitions' panes from the partials topic, reading committed records only.
 *
 * <p>It reads every partials partition (panes are placed by study, not by source) from the beginning up to its high watermark
 * taken BEFORE reading (not the last stable offset): a transaction of another instance that is
 * still open would otherwise hide records committed after it started. The read_committed
 * consumer waits at that open transaction until it ends, then skips aborted records, so when it
 * passes the high watermark every transaction that wrote our sources' records has been
 * resolved. Callers fetch the group's committed offsets first; with read_committed that fetch
 * waits for pending offset commits (KIP-447), so the restored panes match those offsets.
 */
final class PartialsRestorer implements AutoCloseable {

    private static final Logger LOG = LoggerFactory.getLogger(PartialsRestorer.class);
    private static final Duration LIMIT = Duration.ofMinutes(5);

    /** One source partition's restored state; {@code seen} in the order the ids were counted. */
    record Restored(Map<PaneKey, ObservedArms> panes, SourceProgress progress, Map<SeenIds.Key, Long> seen) {
    }

    private final String topic;
    private final int partitions;
    private final KafkaConsumer<byte[], byte[]> consumer;
    private final Admin admin;

    PartialsRestorer(KafkaClients clients, int partitions) {
        this.topic = clients.config().topics().partials();
        this.partitions = partitions;
        this.consumer = clients.committedReader();
        this.admin = clients.admin();
    }

    Map<SourcePartition, Restored> restore(Collection<SourcePartition> sources) {
        Map<SourcePartition, Map<PaneKey, ObservedArms>> panes = new HashMap<>();
        Map<SourcePartition, SourceProgress> progress = new HashMap<>();
        Map<SourcePartition, Map<SeenIds.Key, Long>> seen = new HashMap<>();
        sources.forEach(s -> {
            panes.put(s, new HashMap<>());
            seen.put(s, new LinkedHashMap<>());
        });
        // A source's panes are spread over the partitions of their studies: read them all.
        Set<TopicPartition> tps = new HashSet<>();
        Map<Integer, PartialsCodec.Sink> checks = new HashMap<>();
        PartialsCodec.Sink sink = new PartialsCodec.Sink() {
            @Override
            public void pane(SourcePartition source, PaneKey key, ObservedArms arms) {
                Map<PaneKey, ObservedArms> m = panes.get(source);
                if (m != null) {
                    if (arms == null) {
                        m.remove(key);
                    } else {
                        m.put(key, arms);
                    }
                }
            }

            @Override
            public void progress(SourcePartition source, SourceProgress p) {
                if (panes.containsKey(source)) {
                    progress.put(source, p);
                }
            }

            @Override
            public void seen(SourcePartition source, SeenIds.Key key, Long time) {
                Map<SeenIds.Key, Long> m = seen.get(source);
                if (m != null) {
                    m.remove(key); // counted again: it moves to the end, as it did when it was written
                    if (time != null) {
                        m.put(key, time);
                    }
                }
            }
        };
        for (int p = 0; p < partitions; p++) {
            tps.add(new TopicPartition(topic, p));
            checks.put(p, new PlacementCheck(topic, p, partitions, sink));
        }
        Map<TopicPartition, Long> highWatermarks = highWatermarks(tps);
        consumer.assign(tps);
        consumer.seekToBeginning(tps);
        long deadline = System.nanoTime() + LIMIT.toNanos();
        try {
            while (!reached(highWatermarks)) {
                if (System.nanoTime() > deadline) {
                    throw new IllegalStateException("restoring from '" + topic + "' took longer than " + LIMIT);
                }
                for (ConsumerRecord<byte[], byte[]> r : consumer.poll(Duration.ofMillis(100))) {
                    try {
                        PartialsCodec.decode(r.key(), r.value(), checks.get(r.partition()));
                    } catch (IllegalArgumentException e) {
                        LOG.warn("skipping record {}-{}@{} of the partials topic: {}", r.topic(), r.partition(), r.offset(), e.getMessage());
                    }
                }
            }
        } finally {
            consumer.assign(List.of());
        }
        Map<SourcePartition, Restored> out = new HashMap<>();
        panes.forEach((s, c) -> out.put(s, new Restored(c, progress.getOrDefault(s, SourceProgress.NONE), seen.get(s))));
        return out;
    }

    private boolean reached(Map<TopicPartition, Long> highWatermarks) {
        for (Map.Entry<TopicPartition, Long> e : highWatermarks.entrySet()) {
            if (consumer.position(e.getKey()) < e.getValue()) {
                return false;
            }
        }
        return true;
    }

    private Map<TopicPartition, Long> highWatermarks(Set<TopicPartition> tps) {
        Map<TopicPartition, OffsetSpec> request = new HashMap<>();
        tps.forEach(tp -> request.put(tp, OffsetSpec.latest()));
        try {
            Map<TopicPartition, ListOffsetsResult.ListOffsetsResultInfo> result = admin
                    .listOffsets(request, new ListOffsetsOptions(IsolationLevel.READ_UNCOMMITTED))
                    .all().get(60, TimeUnit.SECONDS);
            Map<TopicPartition, Long> out = new HashMap<>();
            result.forEach((tp, info) -> out.put(tp, info.offset()));
            return out;
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            throw new IllegalStateException("interrupted while reading partials offsets", e);
        } catch (ExecutionException | TimeoutException e) {
            throw new IllegalStateException("cannot read the end offsets of '" + topic + "': " + e.getMessage(), e);
        }
    }

    @Override
    public void close() {
        consumer.close(Duration.ofSeconds(5));
        admin.close(Duration.ofSeconds(5));
    }
}
