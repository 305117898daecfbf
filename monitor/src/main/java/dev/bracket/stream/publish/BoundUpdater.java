package dev.bracket.stream.publish;

import dev.bracket.stream.transaction.KafkaClients;
import dev.bracket.stream.ingest.StudyEventCounts;
import dev.bracket.stream.transaction.PartialsCodec;
import dev.bracket.stream.transaction.PlacementCheck;
import dev.bracket.stream.transaction.StreamMetrics;
import dev.bracket.bounds.StratifiedBounds;
import dev.bracket.config.BracketConfig;
import dev.bracket.config.StudyConfig;
import dev.bracket.config.WindowSpec;
import dev.bracket.report.store.LatestReports;
import dev.bracket.report.store.PublishedReport;
import org.apache.kafka.clients.consumer.ConsumerRebalanceListener;
import dev.bracket.report.StudyReport;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.KafkaException;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.errors.WakeupException;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

import java.nio.charset.StandardCharsets;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.Collection;
import java.util.HashMap;
import java.util.HashSet;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import java.util.function.Consumer;

/**
 * Updates the bounds of the studies this instance owns. It is a member of the updater group
 * ({@link KafkaClients#updaterConsumer}) on the partials topic, where all panes of a study lie in
 * one partition ({@link PartialsCodec#partitionFor(String, int)}), so the group protocol gives
 * each study to exactly one live instance and moves it when that instance leaves or dies.
 *
 * <p>On taking a partition it reads it from the beginning (committed records only) up to its end
 * at that moment; only then are its studies handed to {@link StudyOwnership#taken} (alert state)
 * and published, and the first report waits one publish interval, so a hand-over never puts two
 * documents of a study within one interval. From then on it keeps the latest statistics of every
 * source partition per pane and recomputes a study's reports when its numbers changed, or all of
 * a partition's studies when a time window moves on to its next pane ({@link WindowSpans}), at
 * most once per {@code publish-interval} per study; quiet studies are not republished (the
 * bounds topic is compacted, so their latest document stays readable). Each report goes to the bounds topic as a
 * {@link ReportDocument} keyed {@code study/window} (with the configured confidence bands) and
 * into {@link LatestReports} for the HTTP API, then to the listener (alerts). Run {@link #run} on
 * its own thread.
 */
public final class BoundUpdater implements Runnable, AutoCloseable {

    private static final Logger LOG = LoggerFactory.getLogger(BoundUpdater.class);

    private final BracketConfig config;
    private final KafkaClients clients;
    private final StreamMetrics metrics;
    private final LatestReports latest;
    private final int partialsPartitions;
    private final Clock clock;
    private final Map<Integer, Owned> owned = new HashMap<>();
    private final Set<String> pending = new LinkedHashSet<>();
    private final Map<String, Long> lastPublishNanos = new HashMap<>();
    private final Map<String, Long> revisions = new HashMap<>();
    /** study + stratum already warned about for having units in one arm only. */
    private final Set<String> oneArmedWarned = new HashSet<>();
    private final CountDownLatch stopped = new CountDownLatch(1);
    private final Consumer<PublishedReport> listener;
    private final StudyOwnership ownership;
    private final StudyEventCounts traffic;
    private volatile boolean running = true;
    private volatile KafkaConsumer<byte[], byte[]> consumer;
    /** Wall-clock time of the last published report; 0 before the first. */
    private volatile long lastReportMillis;

    /** One partials partition this instance owns: its studies' merged numbers, and whether they are complete yet. */
    private static final class Owned {
        final MergedPartials merged = new MergedPartials();
        /** Window spans at this partition's watermark: a pane closing changes all its studies. */
        final WindowSpans spans;
        final TrafficTap sink;
        final Set<String> studies;
        final long catchUpTo;
        boolean live;

        Owned(TopicPartition tp, int partitions, Set<String> studies, long catchUpTo, StudyEventCounts traffic, List<WindowSpec> windows) {
            this.spans = new WindowSpans(windows);
            this.sink = new TrafficTap(new PlacementCheck(tp.topic(), tp.partition(), partitions, merged), studies, traffic);
            this.studies = studies;
            this.catchUpTo = catchUpTo;
        }
    }

    public BoundUpdater(KafkaClients clients, StreamMetrics metrics, LatestReports latest, int partialsPartitions, Clock clock) {
        this(clients, metrics, latest, partialsPartitions, clock, report -> { }, StudyOwnership.NONE, StudyEventCounts.NONE);
    }

    /**
     * @param listener  told of every published report after it reached {@link LatestReports}
     *                  (the alert evaluator); called on the updater's thread
     * @param ownership told which studies this instance owns, before their first report
     * @param traffic   told of newly committed events of the studies this instance owns (stall and data-quality alerts)
     */
    public BoundUpdater(KafkaClients clients, StreamMetrics metrics, LatestReports latest, int partialsPartitions, Clock clock,
                        Consumer<PublishedReport> listener, StudyOwnership ownership, StudyEventCounts traffic) {
        this.traffic = traffic;
        this.config = clients.config();
        this.listener = listener;
        this.ownership = ownership;
        this.clients = clients;
        this.metrics = metrics;
        this.latest = latest;
        this.partialsPartitions = partialsPartitions;
        this.clock = clock;
    }

    @Override
    public void run() {
        KafkaProducer<byte[], byte[]> producer = null;
        try {
            consumer = clients.updaterConsumer();
            producer = clients.plainProducer();
            consumer.subscribe(List.of(config.topics().partials()), new Rebalance());
            long interval = config.publishInterval().toNanos();
            while (running) {
                try {
                    for (ConsumerRecord<byte[], byte[]> r : consumer.poll(Duration.ofMillis(100))) {
                        Owned o = owned.get(r.partition());
                        if (o == null) {
                            continue; // revoked during this poll
                        }
                        try {
                            PartialsCodec.decode(r.key(), r.value(), o.sink);
                        } catch (RuntimeException e) { // a damaged record must not stop the reports
                            LOG.warn("skipping record {}-{}@{} of the partials topic: {}", r.topic(), r.partition(), r.offset(), e.getMessage());
                        }
                    }
                    goLive();
                } catch (WakeupException e) {
                    break;
                } catch (KafkaException e) {
                    LOG.warn("reading partials failed, retrying: {}", e.toString());
                    continue;
                }
                for (Owned o : owned.values()) {
                    if (o.live) {
                        // Only the studies whose numbers changed, plus all of the partition's when a pane closed (time alone changed them).
                        MergedPartials.Changes changes = o.merged.takeChanges();
                        pending.addAll(changes.studies());
                        if (changes.watermarkMoved() && o.spans.moved(o.merged.watermark())) {
                            pending.addAll(o.studies);
                        }
                    }
                }
                long now = System.nanoTime();
                for (var it = pending.iterator(); it.hasNext(); ) {
                    String study = it.next();
                    Long last = lastPublishNanos.get(study);
                    if (last == null || now - last >= interval) {
                        lastPublishNanos.put(study, publish(producer, study));
                        it.remove();
                    }
                }
            }
        } finally {
            if (consumer != null) {
                consumer.close();
            }
            if (producer != null) {
                producer.close(Duration.ofSeconds(5));
            }
            stopped.countDown();
        }
    }

    /**
     * Partitions read up to their end at assignment become live: alert state first, then the
     * first report one interval from now (the previous owner may have published just now).
     */
    private void goLive() {
        for (Map.Entry<Integer, Owned> e : owned.entrySet()) {
            Owned o = e.getValue();
            if (!o.live && consumer.position(new TopicPartition(config.topics().partials(), e.getKey())) >= o.catchUpTo) {
                try {
                    ownership.taken(o.studies);
                } catch (RuntimeException ex) {
                    // Judging without the alert state could fire again what already fired: stay silent, retry.
                    LOG.error("cannot take over studies {} yet, retrying: {}", o.studies, ex.getMessage());
                    continue;
                }
                o.live = true;
                o.sink.goLive();
                long now = System.nanoTime();
                for (String study : o.studies) {
                    lastPublishNanos.put(study, now);
                    pending.add(study);
                }
                o.merged.takeChanges();
                o.spans.moved(o.merged.watermark()); // the spans of the restored watermark go out with this first report
                LOG.info("updating studies {} (partials partition {})", o.studies, e.getKey());
            }
        }
    }

    /**
     * Publishes the study's reports of every window and returns when (System.nanoTime) they were
     * handed to the producer; the documents carry the same moment as their record timestamp.
     */
    private long publish(KafkaProducer<byte[], byte[]> producer, String studyId) {
        StudyConfig study = config.study(studyId).orElse(null);
        Owned o = owned.get(PartialsCodec.partitionFor(studyId, partialsPartitions));
        if (study == null || o == null) {
            return System.nanoTime(); // partials of a study no longer configured, or no longer ours
        }
        List<WindowReport> reports = new ArrayList<>();
        for (WindowSpec window : config.windows()) {
            reports.add(WindowReport.current(study, window, o.merged, config.bands()));
        }
        // Taken after the computation, so the time between two documents is never shorter than the interval.
        long sentNanos = System.nanoTime();
        Instant now = clock.instant();
        for (WindowReport report : reports) {
            String key = study.id() + "/" + report.window().name();
            long revision = revisions.merge(key, 1L, Long::sum);
            byte[] doc = ReportDocument.bytes(report, revision, now);
            producer.send(new ProducerRecord<>(config.topics().bounds(), null, now.toEpochMilli(),
                    key.getBytes(StandardCharsets.UTF_8), doc), (md, e) -> {
                if (e != null) {
                    LOG.warn("publishing {} failed: {}", key, e.toString());
                }
            });
        }
        for (WindowReport report : reports) {
            WindowSpec window = report.window();
            boolean cumulative = window.kind() == WindowSpec.Kind.CUMULATIVE;
            warnOneArmed(study.id(), report.report());
            PublishedReport published = new PublishedReport(study.id(), window.name(),
                    cumulative ? null : Instant.ofEpochMilli(report.start()), cumulative ? null : Instant.ofEpochMilli(report.end()),
                    now, report.report(), report.lost());
            latest.put(published);
            try {
                listener.accept(published);
            } catch (RuntimeException e) {
                LOG.error("report listener failed on {}/{}: {}", study.id(), report.window().name(), e.toString());
            }
        }
        metrics.published(study.id());
        lastReportMillis = System.currentTimeMillis();
        return sentNanos;
    }

    /** When a report was last published (epoch millis), 0 before the first; safe from any thread. */
    public long lastReportMillis() {
        return lastReportMillis;
    }

    /** Once per study and stratum: its interval is the worst case whatever the assumptions, and bands wait. */
    private void warnOneArmed(String study, StudyReport report) {
        for (String stratum : StratifiedBounds.oneArmed(report.cells())) {
            if (oneArmedWarned.add(study + '\u0000' + stratum)) {
                LOG.warn("study {}: stratum '{}' has units in one arm only; its interval is the worst case whatever the"
                        + " assumptions (the missing arm's mean may be anywhere in the outcome range), and the study's"
                        + " confidence bands wait until both arms are seen there{}", study, stratum,
                        stratum.isEmpty() ? " (the stratum of events without a stratum field)" : "");
            }
        }
    }

    private final class Rebalance implements ConsumerRebalanceListener {
        @Override
        public void onPartitionsAssigned(Collection<TopicPartition> partitions) {
            if (partitions.isEmpty()) {
                return;
            }
            Map<TopicPartition, Long> ends = consumer.endOffsets(partitions);
            consumer.seekToBeginning(partitions);
            for (TopicPartition tp : partitions) {
                Set<String> studies = new LinkedHashSet<>();
                config.studies().stream().map(StudyConfig::id)
                        .filter(id -> PartialsCodec.partitionFor(id, partialsPartitions) == tp.partition())
                        .forEach(studies::add);
                owned.put(tp.partition(), new Owned(tp, partialsPartitions, Set.copyOf(studies), ends.getOrDefault(tp, 0L), traffic, config.windows()));
            }
        }

        @Override
        public void onPartitionsRevoked(Collection<TopicPartition> partitions) {
            release(partitions);
        }

        @Override
        public void onPartitionsLost(Collection<TopicPartition> partitions) {
            release(partitions);
        }

        private void release(Collection<TopicPartition> partitions) {
            for (TopicPartition tp : partitions) {
                Owned o = owned.remove(tp.partition());
                if (o == null) {
                    continue;
                }
                pending.removeAll(o.studies);
                o.studies.forEach(study -> {
                    lastPublishNanos.remove(study);
                    latest.forget(study);
                    // Revisions count per owner: should the study come back here, it starts again at 1.
                    config.windows().forEach(w -> revisions.remove(study + "/" + w.name()));
                });
                if (o.live) {
                    ownership.released(o.studies);
                    LOG.info("no longer updating studies {} (partials partition {})", o.studies, tp.partition());
                }
            }
        }
    }

    /** Stops the loop and waits for it. */
    @Override
    public void close() {
        running = false;
        KafkaConsumer<byte[], byte[]> c = consumer;
        if (c != null) {
            c.wakeup();
        }
        try {
            stopped.await(30, TimeUnit.SECONDS);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
    }
}
