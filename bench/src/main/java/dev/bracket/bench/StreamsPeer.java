package dev.bracket.bench;

import dev.bracket.stream.ingest.EventParser;
import dev.bracket.stream.ingest.ParsedEvent;
import dev.bracket.config.BracketConfig;
import dev.bracket.config.WindowSpec;
import dev.bracket.stream.ingest.EventParser;
import dev.bracket.stream.ingest.ParsedEvent;
import org.apache.kafka.common.serialization.Serdes;
import org.apache.kafka.common.utils.Bytes;
import org.apache.kafka.streams.KafkaStreams;
import org.apache.kafka.streams.KeyValue;
import org.apache.kafka.streams.StoreQueryParameters;
import org.apache.kafka.streams.StreamsBuilder;
import org.apache.kafka.streams.StreamsConfig;
import org.apache.kafka.streams.kstream.Consumed;
import org.apache.kafka.streams.kstream.Grouped;
import org.apache.kafka.streams.kstream.Materialized;
import org.apache.kafka.streams.kstream.Produced;
import org.apache.kafka.streams.state.KeyValueIterator;
import org.apache.kafka.streams.state.KeyValueStore;
import org.apache.kafka.streams.state.QueryableStoreTypes;
import org.apache.kafka.streams.state.ReadOnlyKeyValueStore;

import java.nio.ByteBuffer;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Properties;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicLong;

/**
 * The benchmark's peer: the same per-row statistics written the way a Kafka Streams user
 * would, exactly-once (EOS v2), one stream thread. Each event is parsed by the monitor's own
 * {@link EventParser} (so the comparison is about the aggregation, not the parser), re-keyed by
 * its cells (study, stratum, instrument level, window and pane: one per configured window, as
 * in the monitor), grouped by that key (Kafka Streams
 * inserts a repartition topic, as it must: one cell's events arrive on every input partition)
 * and folded by {@code aggregate} into an 80-byte binary aggregate (count, mean, M2, min, max
 * per arm; the same Welford step) in a RocksDB store with the record cache on; the table's
 * changes go to an output topic. Commit interval as the monitor's.
 *
 * <p>Differences from the monitor, in the peer's favour: no late-event accounting, no eviction
 * of closed panes, no rejected topic (the benchmark's events are all usable).
 */
final class StreamsPeer implements AutoCloseable {

    static final String STORE = "cells";
    private static final int AGGREGATE_BYTES = 80;

    private final KafkaStreams streams;
    private final AtomicLong folded = new AtomicLong();
    private final CountDownLatch running = new CountDownLatch(1);

    StreamsPeer(BracketConfig config, String inputTopic, String applicationId, Path stateDir) {
        List<WindowSpec> windows = config.windows();
        Properties p = new Properties();
        p.put(StreamsConfig.APPLICATION_ID_CONFIG, applicationId);
        p.put(StreamsConfig.BOOTSTRAP_SERVERS_CONFIG, config.kafka().get("bootstrap.servers"));
        p.put(StreamsConfig.PROCESSING_GUARANTEE_CONFIG, StreamsConfig.EXACTLY_ONCE_V2);
        p.put(StreamsConfig.COMMIT_INTERVAL_MS_CONFIG, config.commitInterval().toMillis());
        p.put(StreamsConfig.NUM_STREAM_THREADS_CONFIG, 1);
        p.put(StreamsConfig.REPLICATION_FACTOR_CONFIG, 1);
        p.put(StreamsConfig.STATE_DIR_CONFIG, stateDir.toString());
        p.put(StreamsConfig.consumerPrefix("auto.offset.reset"), "earliest");

        ThreadLocal<EventParser> parsers = ThreadLocal.withInitial(() ->
                EventParser.forInput(config, config.inputs().get(0).fields()));
        StreamsBuilder builder = new StreamsBuilder();
        builder.stream(inputTopic, Consumed.with(Serdes.ByteArray(), Serdes.ByteArray()))
                .flatMap((key, value) -> {
                    // The record timestamps are the produce times, about now: like the monitor, let the
                    // event times (from 2025 on) pass the clock-skew check against the clock.
                    long now = System.currentTimeMillis();
                    ParsedEvent e = parsers.get().parse(value, now, now);
                    if (!e.isUsable()) {
                        return List.<KeyValue<byte[], byte[]>>of();
                    }
                    byte[] obs = ByteBuffer.allocate(9).put((byte) (e.treated() ? 1 : 0)).putDouble(e.outcome()).array();
                    List<KeyValue<byte[], byte[]>> out = new ArrayList<>(windows.size());
                    for (WindowSpec w : windows) {
                        String cell = e.study().id() + '\u0000' + e.stratum() + '\u0000' + e.instrument() + '\u0000' + w.name()
                                + '\u0000' + w.paneStart(e.time());
                        out.add(KeyValue.pair(cell.getBytes(StandardCharsets.UTF_8), obs));
                    }
                    return out;
                })
                .groupByKey(Grouped.with("cells", Serdes.ByteArray(), Serdes.ByteArray()))
                .aggregate(() -> new byte[AGGREGATE_BYTES], (cell, obs, aggregate) -> {
                    folded.incrementAndGet();
                    return fold(aggregate, obs);
                }, Materialized.<byte[], byte[], KeyValueStore<Bytes, byte[]>>as(STORE)
                        .withKeySerde(Serdes.ByteArray()).withValueSerde(Serdes.ByteArray()))
                .toStream()
                .to(applicationId + "-out", Produced.with(Serdes.ByteArray(), Serdes.ByteArray()));
        streams = new KafkaStreams(builder.build(), p);
        streams.setStateListener((now, before) -> {
            if (now == KafkaStreams.State.RUNNING) {
                running.countDown();
            }
        });
    }

    /** Welford's step on the observed arm (treated: bytes 0-39, control: 40-79), into a new array. */
    static byte[] fold(byte[] aggregate, byte[] obs) {
        ByteBuffer in = ByteBuffer.wrap(obs);
        boolean treated = in.get() == 1;
        double y = in.getDouble();
        ByteBuffer out = ByteBuffer.allocate(AGGREGATE_BYTES).put(aggregate).flip();
        int at = treated ? 0 : 40;
        long n = out.getLong(at);
        double mean = out.getDouble(at + 8);
        double delta = y - mean;
        double newMean = mean + delta / (n + 1);
        out.putLong(at, n + 1)
                .putDouble(at + 8, newMean)
                .putDouble(at + 16, out.getDouble(at + 16) + delta * (y - newMean))
                .putDouble(at + 24, n == 0 ? y : Math.min(out.getDouble(at + 24), y))
                .putDouble(at + 32, n == 0 ? y : Math.max(out.getDouble(at + 32), y));
        return out.array();
    }

    void start() {
        streams.start();
    }

    /** Waits until the application runs (tasks assigned and restored). */
    void awaitRunning(long timeoutSeconds) throws InterruptedException {
        if (!running.await(timeoutSeconds, TimeUnit.SECONDS)) {
            throw new IllegalStateException("Kafka Streams did not reach RUNNING: " + streams.state());
        }
    }

    /** (event, window) pairs folded into the store so far. */
    long folded() {
        return folded.get();
    }

    /** Sum of both arms' counts over all cells in the store: events read times windows. */
    long countInStore() {
        ReadOnlyKeyValueStore<byte[], byte[]> store = streams.store(
                StoreQueryParameters.fromNameAndType(STORE, QueryableStoreTypes.keyValueStore()));
        long total = 0;
        try (KeyValueIterator<byte[], byte[]> it = store.all()) {
            while (it.hasNext()) {
                ByteBuffer b = ByteBuffer.wrap(it.next().value);
                total += b.getLong(0) + b.getLong(40);
            }
        }
        return total;
    }

    @Override
    public void close() {
        streams.close();
        streams.cleanUp();
    }
}
