package dev.bracket.stream.transaction;

import dev.bracket.stream.ingest.SeenIds;
import dev.bracket.stream.ingest.EventParser;
import dev.bracket.stream.ingest.PaneKey;
import dev.bracket.stream.ingest.ParsedEvent;
import dev.bracket.stream.ingest.PartitionState;
import dev.bracket.stream.ingest.RejectReason;
import dev.bracket.stream.ingest.SourcePartition;
import dev.bracket.config.BracketConfig;
import dev.bracket.config.InputTopic;
import dev.bracket.retry.Backoff;
import io.micrometer.core.instrument.binder.kafka.KafkaClientMetrics;
import org.apache.kafka.clients.consumer.ConsumerRebalanceListener;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.ConsumerRecords;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.clients.consumer.OffsetAndMetadata;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.KafkaException;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.errors.InterruptException;
import org.apache.kafka.common.errors.WakeupException;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

import java.nio.ByteBuffer;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Collection;
import java.util.HashMap;
import java.util.HashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.ThreadLocalRandom;

/**
 * One member of the aggregation consumer group: reads events, keeps each assigned partition's
 * panes in memory ({@link PartitionState}) and every commit interval writes the changed panes'
 * cumulative statistics to the partials topic and commits the input offsets in the same Kafka
 * transaction ({@code sendOffsetsToTransaction} with the consumer's group metadata, so a member
 * that lost its partitions is fenced). Rejected events go to the rejected topic inside the same
 * transactions. The meters' event counts (and so the progress line) are kept per transaction
 * ({@link CommittedCounts}) and added only once it commits; the per-study counts the alert rules
 * judge travel in each partition's progress record, so they are committed or dropped with the
 * transaction too. Event ids counted ({@link SeenIds},
 * for rejecting an at-least-once producer's retries) are written in the same transactions.
 *
 * <p>Why nothing is lost or counted twice: the partials and the offsets become visible together
 * or not at all. On assignment a partition's panes are rebuilt from the committed partials and
 * reading starts at the committed offset, which describe the same point of the stream. After any
 * error the open transaction is aborted and every assigned partition is rebuilt the same way.
 *
 * <p>Run {@link #run} on a thread of its own; {@link #close} stops it from any thread.
 */
public final class StreamAggregator implements Runnable, AutoCloseable {

    private static final Logger LOG = LoggerFactory.getLogger(StreamAggregator.class);

    private final BracketConfig config;
    private final KafkaClients clients;
    private final StreamMetrics metrics;
    private final int partialsPartitions;
    private final int member;
    private volatile int owned;
    private final Map<String, EventParser> parsers = new HashMap<>();
    private final RejectedCopies rejectedCopies;
    /** The open transaction's meter counts: added to the meters when it commits, dropped when it aborts. */
    private final CommittedCounts counts;
    /** Per study (in configuration order, as the parsers number them): accepted, rejected, out of range; per partition of a poll. */
    private final long[][] studyCounts;
    /** Rejected records without a readable study, per partition of a poll. */
    private long unattributed;
    private final Map<TopicPartition, PartitionState> states = new HashMap<>();
    /** Per assigned partition, the event ids counted (absent when deduplication is off). */
    private final Map<TopicPartition, SeenIds> seenIds = new HashMap<>();
    private final Map<TopicPartition, Long> pendingOffsets = new HashMap<>();
    private final CountDownLatch stopped = new CountDownLatch(1);
    /** Retries after a failed poll or commit: 0.5 s, doubling up to 10 s (common practice, no source). */
    private static final Backoff RETRY = new Backoff(Duration.ofMillis(500), Duration.ofSeconds(10));
    private int failuresInARow;
    private volatile boolean running = true;
    private volatile KafkaConsumer<ByteBuffer, ByteBuffer> consumer;
    private KafkaProducer<byte[], byte[]> producer;
    private PartialsRestorer restorer;
    private boolean inTransaction;
    private boolean needsReset;
    private long lastCommitNanos;
    /** Set when an unexpected error ends the loop: from then on nothing is committed, not even on close. */
    private volatile Throwable failure;
    /** Wall-clock time of the last commit, or of the last check that found nothing to commit. */
    private volatile long upToDateMillis = System.currentTimeMillis();
    /** Whether the group gave this member its partitions (possibly none) since it joined or lost them. */
    private volatile boolean assigned;
    private volatile long unassignedSinceMillis = System.currentTimeMillis();
    // The record being processed, named in the log when its transaction fails.
    private TopicPartition currentPartition;
    private long currentOffset = -1;

    /**
     * @param member      this member's number within the instance (0 for the first); part of its transactional id
     */
    public StreamAggregator(KafkaClients clients, StreamMetrics metrics, int partialsPartitions, int member) {
        this.config = clients.config();
        this.clients = clients;
        this.metrics = metrics;
        this.partialsPartitions = partialsPartitions;
        this.member = member;
        this.counts = new CommittedCounts();
        this.studyCounts = new long[config.studies().size()][3];
        this.rejectedCopies = new RejectedCopies(config.topics().rejected(), RejectedCopies.limit(config.kafka()));
        for (InputTopic in : config.inputs()) {
            parsers.put(in.topic(), EventParser.forInput(config, in.fields()));
        }
    }

    @Override
    public void run() {
        KafkaClientMetrics consumerMetrics = null;
        try {
            consumer = clients.groupConsumer();
            // Kafka's own consumer metrics, records-lag-max among them: how far the monitor trails its input.
            consumerMetrics = new KafkaClientMetrics(consumer);
            consumerMetrics.bindTo(metrics.registry());
            restorer = new PartialsRestorer(clients, partialsPartitions);
            producer = newProducer();
            if (!running) {
                return;
            }
            consumer.subscribe(config.inputs().stream().map(InputTopic::topic).toList(), new Rebalance());
            lastCommitNanos = System.nanoTime();
            long commitNanos = config.commitInterval().toNanos();
            try {
                loop(commitNanos);
            } catch (RuntimeException | Error e) {
                // Unexpected: the in-memory cells may be ahead of the pending offsets. Abort, and
                // let no later commit (the consumer's close revokes partitions) write them.
                failure = e;
                abortQuietly();
                throw e;
            }
            if (!needsReset) {
                commit();
            }
        } finally {
            if (consumerMetrics != null) {
                consumerMetrics.close();
            }
            closeClients();
            states.clear();
            seenIds.clear();
            countOwned();
            stopped.countDown();
        }
    }

    private void loop(long commitNanos) {
        while (running) {
            try {
                if (needsReset) {
                    resetToCommitted(consumer.assignment());
                }
                ConsumerRecords<ByteBuffer, ByteBuffer> records = consumer.poll(Duration.ofMillis(100));
                if (needsReset) {
                    continue; // a callback failed: the batch may predate the reset
                }
                process(records);
                if (System.nanoTime() - lastCommitNanos >= commitNanos) {
                    commit();
                }
                failuresInARow = 0;
            } catch (WakeupException e) {
                // close() was called; the loop condition ends it.
            } catch (KafkaException | IllegalStateException e) {
                if (running) {
                    recover(e);
                    pause();
                }
            }
        }
    }

    private void process(ConsumerRecords<ByteBuffer, ByteBuffer> records) {
        long now = System.currentTimeMillis();
        for (TopicPartition tp : records.partitions()) {
            PartitionState state = states.get(tp);
            if (state == null) {
                continue; // not ours any more
            }
            EventParser parser = parsers.get(tp.topic());
            SeenIds seen = seenIds.get(tp);
            long next = -1;
            long accepted = 0;
            currentPartition = tp;
            for (ConsumerRecord<ByteBuffer, ByteBuffer> r : records.records(tp)) {
                currentOffset = r.offset();
                ParsedEvent e = parse(parser, r.value(), r.timestamp(), now);
                if (seen != null) {
                    seen.check(e, state.streamTime());
                }
                int study = e.studyIndex();
                if (e.isUsable()) {
                    state.add(e);
                    accepted++;
                    studyCounts[study][0]++;
                } else {
                    counts.rejected(tp.topic(), e.rejection());
                    if (study >= 0) {
                        studyCounts[study][1]++;
                        studyCounts[study][2] += e.rejection() == RejectReason.OUT_OF_RANGE ? 1 : 0;
                    } else {
                        unattributed++;
                    }
                    reject(r, e);
                }
                next = r.offset() + 1;
            }
            if (next >= 0) {
                pendingOffsets.put(tp, next);
            }
            if (accepted > 0) {
                counts.accepted(tp.topic(), accepted);
            }
            for (int i = 0; i < studyCounts.length; i++) {
                long[] c = studyCounts[i];
                if (c[0] + c[1] > 0) {
                    state.countTraffic(config.studies().get(i).id(), c[0], c[1], c[2]);
                    Arrays.fill(c, 0);
                }
            }
            if (unattributed > 0) {
                state.countUnattributed(unattributed);
                unattributed = 0;
            }
        }
    }

    /** Parses a record's value where the consumer fetched it (a heap buffer), else from a copy. */
    private static ParsedEvent parse(EventParser parser, ByteBuffer value, long timestamp, long now) {
        if (value != null && value.hasArray()) {
            return parser.parse(value.array(), value.arrayOffset() + value.position(), value.remaining(), timestamp, now);
        }
        return parser.parse(RejectedCopies.bytes(value), timestamp, now);
    }

    private void reject(ConsumerRecord<ByteBuffer, ByteBuffer> r, ParsedEvent e) {
        beginIfNeeded();
        ProducerRecord<byte[], byte[]> copy = rejectedCopies.copy(r, e.rejection(), e.detail());
        producer.send(copy, (md, ex) -> {
            if (ex != null) {
                LOG.warn("copying rejected record {}-{}@{} to '{}' failed: {}", r.topic(), r.partition(), r.offset(),
                        copy.topic(), ex.toString());
            }
        });
    }

    /** Writes changed partials and commits them with the input offsets in one transaction. */
    private void commit() {
        lastCommitNanos = System.nanoTime();
        boolean dirty = inTransaction || !pendingOffsets.isEmpty();
        for (PartitionState s : states.values()) {
            dirty |= s.progressChanged();
        }
        if (!dirty) {
            upToDateMillis = System.currentTimeMillis();
            return;
        }
        long start = System.nanoTime();
        try {
            beginIfNeeded();
            String partials = config.topics().partials();
            for (PartitionState s : states.values()) {
                SourcePartition src = s.source();
                for (PaneKey closed : s.evictClosed()) {
                    producer.send(new ProducerRecord<>(partials, PartialsCodec.partitionFor(closed.study(), partialsPartitions),
                            PartialsCodec.paneKey(src, closed), null));
                }
                s.forEachDirty((key, arms) -> producer.send(new ProducerRecord<>(partials,
                        PartialsCodec.partitionFor(key.study(), partialsPartitions),
                        PartialsCodec.paneKey(src, key), PartialsCodec.paneValue(arms))));
                if (s.progressChanged()) {
                    byte[] key = PartialsCodec.progressKey(src);
                    byte[] value = PartialsCodec.progressValue(s.progress());
                    for (int partition = 0; partition < partialsPartitions; partition++) {
                        producer.send(new ProducerRecord<>(partials, partition, key, value));
                    }
                }
            }
            seenIds.forEach((tp, seen) -> {
                SourcePartition src = states.get(tp).source();
                seen.forgetExpired(states.get(tp).streamTime());
                seen.forEachChange((key, time) -> producer.send(new ProducerRecord<>(partials,
                        PartialsCodec.partitionFor(key.study(), partialsPartitions),
                        PartialsCodec.seenKey(src, key), PartialsCodec.seenValue(time))));
            });
            if (!pendingOffsets.isEmpty()) {
                Map<TopicPartition, OffsetAndMetadata> offsets = new HashMap<>();
                pendingOffsets.forEach((tp, next) -> offsets.put(tp, new OffsetAndMetadata(next)));
                producer.sendOffsetsToTransaction(offsets, consumer.groupMetadata());
            }
            producer.commitTransaction();
            inTransaction = false;
            states.values().forEach(PartitionState::markClean);
            seenIds.values().forEach(SeenIds::markClean);
            pendingOffsets.clear();
            upToDateMillis = System.currentTimeMillis();
            metrics.committed();
            metrics.commitTimer().record(Duration.ofNanos(System.nanoTime() - start));
            counts.publish(metrics);
        } catch (KafkaException | IllegalStateException e) {
            if (e instanceof InterruptException) {
                throw e;
            }
            recover(e);
        }
    }

    private void beginIfNeeded() {
        if (!inTransaction) {
            producer.beginTransaction();
            inTransaction = true;
        }
    }

    /**
     * Aborts the open transaction (or replaces a producer that can no longer abort, e.g. fenced)
     * and schedules a rebuild of every assigned partition from committed state.
     */
    private void recover(RuntimeException cause) {
        LOG.warn("aggregation error (last record read: {}@{}; uncommitted input up to {}), aborting and restarting from the last commit: {}",
                currentPartition, currentOffset, pendingOffsets, cause.toString());
        metrics.aborted();
        counts.discard(); // every assigned partition is read again from the last commit
        if (inTransaction) {
            try {
                producer.abortTransaction();
            } catch (KafkaException e) {
                LOG.warn("abort failed ({}); replacing the producer", e.toString());
                replaceProducer();
            }
            inTransaction = false;
        } else if (!(cause instanceof IllegalStateException) && isFatalForProducer(cause)) {
            replaceProducer();
        }
        needsReset = true;
    }

    /** Aborts the open transaction, if any, after an unexpected error; the failure itself is what gets reported. */
    private void abortQuietly() {
        counts.discard();
        if (inTransaction && producer != null) {
            try {
                producer.abortTransaction();
            } catch (RuntimeException e) {
                LOG.warn("aborting after the failure failed too ({}); the broker aborts the transaction when it times out", e.toString());
            }
            inTransaction = false;
        }
    }

    private static boolean isFatalForProducer(RuntimeException e) {
        return e instanceof org.apache.kafka.common.errors.ProducerFencedException
                || e instanceof org.apache.kafka.common.errors.InvalidProducerEpochException
                || e instanceof org.apache.kafka.common.errors.OutOfOrderSequenceException;
    }

    private void replaceProducer() {
        try {
            producer.close(Duration.ZERO);
        } catch (KafkaException e) {
            LOG.debug("closing the old producer failed", e);
        }
        producer = newProducer();
    }

    private KafkaProducer<byte[], byte[]> newProducer() {
        KafkaProducer<byte[], byte[]> p = clients.transactionalProducer(member);
        p.initTransactions();
        return p;
    }

    /** Drops the given partitions' state and rebuilds it from the partials topic and the committed offsets. */
    private void resetToCommitted(Collection<TopicPartition> partitions) {
        forget(partitions);
        if (!partitions.isEmpty()) {
            restore(partitions);
        }
        needsReset = false;
    }

    private void restore(Collection<TopicPartition> partitions) {
        Set<TopicPartition> set = new HashSet<>(partitions);
        // First the committed offsets: with read_committed this waits until no transaction that
        // commits offsets for these partitions is pending, so the partials read next are final.
        Map<TopicPartition, OffsetAndMetadata> committed = consumer.committed(set);
        List<SourcePartition> sources = new ArrayList<>();
        set.forEach(tp -> sources.add(new SourcePartition(tp.topic(), tp.partition())));
        Map<SourcePartition, PartialsRestorer.Restored> restored = restorer.restore(sources);
        for (TopicPartition tp : set) {
            SourcePartition src = new SourcePartition(tp.topic(), tp.partition());
            PartitionState state = new PartitionState(src, config.windows(), config.grace().toMillis(),
                    (study, window) -> counts.late(study.id(), window.name()));
            PartialsRestorer.Restored r = restored.get(src);
            r.panes().forEach(state::restorePane);
            state.restoreProgress(r.progress());
            states.put(tp, state);
            if (config.dedup().enabled()) {
                SeenIds seen = new SeenIds(config.dedup());
                seen.restore(r.seen());
                seenIds.put(tp, seen);
            }
            OffsetAndMetadata at = committed.get(tp);
            if (at != null) {
                consumer.seek(tp, at);
            } else {
                consumer.seekToBeginning(List.of(tp));
            }
        }
        metrics.restored(set.size());
        countOwned();
        LOG.info("restored {} partition(s) {} from '{}'", set.size(), set, config.topics().partials());
    }

    private final class Rebalance implements ConsumerRebalanceListener {
        @Override
        public void onPartitionsRevoked(Collection<TopicPartition> partitions) {
            if (!needsReset && failure == null) {
                commit(); // hands over exactly what was processed
            }
            forget(partitions);
            countOwned();
        }

        @Override
        public void onPartitionsAssigned(Collection<TopicPartition> partitions) {
            if (!partitions.isEmpty() && !needsReset) {
                restore(partitions);
            }
            assigned = true; // called after every rebalance, with no partitions too
        }

        @Override
        public void onPartitionsLost(Collection<TopicPartition> partitions) {
            // Another member may already own them: write nothing for them, and rebuild the rest.
            counts.discard();
            if (inTransaction) {
                try {
                    producer.abortTransaction();
                } catch (KafkaException e) {
                    replaceProducer();
                }
                inTransaction = false;
            }
            forget(partitions);
            needsReset = true;
            countOwned();
            unassigned();
        }
    }

    /** Drops the partitions' in-memory state (rebuilt from the partials topic when assigned again) and uncommitted offsets. */
    private void forget(Collection<TopicPartition> partitions) {
        for (TopicPartition tp : partitions) {
            states.remove(tp);
            seenIds.remove(tp);
            pendingOffsets.remove(tp);
        }
    }

    private void countOwned() {
        metrics.partitionsOwnedChanged(states.size() - owned);
        owned = states.size();
    }

    private void pause() {
        try {
            // Waits longer after each failure in a row, so a broker that keeps failing us is not hammered.
            Thread.sleep(RETRY.delay(++failuresInARow, ThreadLocalRandom.current()).toMillis());
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            running = false;
        }
    }

    private void closeClients() {
        for (AutoCloseable c : new AutoCloseable[] {consumer, restorer, producer}) {
            if (c != null) {
                try {
                    c.close();
                } catch (Exception e) {
                    LOG.debug("close failed", e);
                }
            }
        }
    }

    private void unassigned() {
        if (assigned) {
            unassignedSinceMillis = System.currentTimeMillis();
            assigned = false;
        }
    }

    /** What health checks read; safe from any thread. */
    public Status status() {
        return new Status(assigned, owned, upToDateMillis, unassignedSinceMillis, failure);
    }

    /**
     * @param assigned         whether the group has given this member its share (possibly no partitions)
     * @param partitions       input partitions owned now
     * @param upToDateMillis   when this member last committed, or last found nothing to commit
     * @param unassignedSince  when it last joined or lost its partitions (meaningful while not assigned)
     * @param failure          the error that ended the member, or null
     */
    public record Status(boolean assigned, int partitions, long upToDateMillis, long unassignedSince, Throwable failure) {
    }

    /** Stops the loop after a final commit and waits for it (at most {@code timeout}). */
    public void close(Duration timeout) {
        running = false;
        KafkaConsumer<ByteBuffer, ByteBuffer> c = consumer;
        if (c != null) {
            c.wakeup();
        }
        try {
            stopped.await(timeout.toMillis(), java.util.concurrent.TimeUnit.MILLISECONDS);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
    }

    @Override
    public void close() {
        close(Duration.ofSeconds(30));
    }

}
