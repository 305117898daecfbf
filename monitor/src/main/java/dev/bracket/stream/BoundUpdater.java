package dev.bracket.stream;

import dev.bracket.bounds.StratifiedBounds;
import dev.bracket.config.BracketConfig;
import dev.bracket.config.StudyConfig;
import dev.bracket.config.WindowSpec;
import dev.bracket.report.LatestReports;
import dev.bracket.report.PublishedReport;
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
 * Reads the partials topic (committed records only), keeps the latest statistics of every
 * source partition per cell, and recomputes a study's reports when its numbers changed, at most
 * once per {@code publish-interval} per study. Each report goes to the bounds topic as a
 * {@link ReportDocument} keyed {@code study/window} (with the configured confidence bands) and into {@link LatestReports} for the HTTP API, then to the listener (alerts). Run {@link #run} on its own thread.
 */
public final class BoundUpdater implements Runnable, AutoCloseable {

    private static final Logger LOG = LoggerFactory.getLogger(BoundUpdater.class);

    private final BracketConfig config;
    private final KafkaClients clients;
    private final StreamMetrics metrics;
    private final LatestReports latest;
    private final int partialsPartitions;
    private final Clock clock;
    private final MergedPartials merged = new MergedPartials();
    private final Set<String> pending = new LinkedHashSet<>();
    private final Map<String, Long> lastPublishNanos = new HashMap<>();
    private final Map<String, Long> revisions = new HashMap<>();
    /** study + stratum already warned about for having units in one arm only. */
    private final Set<String> oneArmedWarned = new HashSet<>();
    private final CountDownLatch stopped = new CountDownLatch(1);
    private final WindowSpans spans;
    private final Consumer<PublishedReport> listener;
    private volatile boolean running = true;
    private volatile KafkaConsumer<byte[], byte[]> consumer;
    /** Wall-clock time of the last published report; 0 before the first. */
    private volatile long lastReportMillis;

    public BoundUpdater(KafkaClients clients, StreamMetrics metrics, LatestReports latest, int partialsPartitions, Clock clock) {
        this(clients, metrics, latest, partialsPartitions, clock, report -> { });
    }

    /**
     * @param listener told of every published report after it reached {@link LatestReports}
     *                 (the alert evaluator); called on the updater's thread
     */
    public BoundUpdater(KafkaClients clients, StreamMetrics metrics, LatestReports latest, int partialsPartitions, Clock clock,
                        Consumer<PublishedReport> listener) {
        this.config = clients.config();
        this.listener = listener;
        this.clients = clients;
        this.metrics = metrics;
        this.latest = latest;
        this.partialsPartitions = partialsPartitions;
        this.clock = clock;
        this.spans = new WindowSpans(config.windows());
    }

    @Override
    public void run() {
        KafkaProducer<byte[], byte[]> producer = null;
        try {
            consumer = clients.committedReader();
            producer = clients.plainProducer();
            List<TopicPartition> tps = new ArrayList<>();
            for (int p = 0; p < partialsPartitions; p++) {
                tps.add(new TopicPartition(config.topics().partials(), p));
            }
            consumer.assign(tps);
            consumer.seekToBeginning(tps);
            long interval = config.publishInterval().toNanos();
            while (running) {
                try {
                    for (ConsumerRecord<byte[], byte[]> r : consumer.poll(Duration.ofMillis(100))) {
                        try {
                            PartialsCodec.decode(r.key(), r.value(), merged);
                        } catch (RuntimeException e) { // a damaged record must not stop the reports
                            LOG.warn("skipping record {}-{}@{} of the partials topic: {}", r.topic(), r.partition(), r.offset(), e.getMessage());
                        }
                    }
                } catch (WakeupException e) {
                    break;
                } catch (KafkaException e) {
                    LOG.warn("reading partials failed, retrying: {}", e.toString());
                    continue;
                }
                MergedPartials.Changes changes = merged.takeChanges();
                pending.addAll(changes.studies());
                if (changes.watermarkMoved() && spans.moved(merged.watermark())) { // a pane closed: time alone changed every study
                    config.studies().forEach(s -> pending.add(s.id()));
                }
                long now = System.nanoTime();
                for (var it = pending.iterator(); it.hasNext(); ) {
                    String study = it.next();
                    Long last = lastPublishNanos.get(study);
                    if (last == null || now - last >= interval) {
                        publish(producer, study);
                        lastPublishNanos.put(study, now);
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

    private void publish(KafkaProducer<byte[], byte[]> producer, String studyId) {
        StudyConfig study = config.study(studyId).orElse(null);
        if (study == null) {
            return; // partials of a study no longer configured
        }
        Instant now = clock.instant();
        for (WindowSpec window : config.windows()) {
            WindowReport report = WindowReport.current(study, window, merged, config.bands());
            String key = study.id() + "/" + window.name();
            long revision = revisions.merge(key, 1L, Long::sum);
            byte[] doc = ReportDocument.bytes(report, revision, now);
            producer.send(new ProducerRecord<>(config.topics().bounds(), key.getBytes(StandardCharsets.UTF_8), doc), (md, e) -> {
                if (e != null) {
                    LOG.warn("publishing {} failed: {}", key, e.toString());
                }
            });
            boolean cumulative = window.kind() == WindowSpec.Kind.CUMULATIVE;
            warnOneArmed(study.id(), report.report());
            PublishedReport published = new PublishedReport(study.id(), window.name(),
                    cumulative ? null : Instant.ofEpochMilli(report.start()), cumulative ? null : Instant.ofEpochMilli(report.end()),
                    now, report.report());
            latest.put(published);
            try {
                listener.accept(published);
            } catch (RuntimeException e) {
                LOG.error("report listener failed on {}: {}", key, e.toString());
            }
        }
        metrics.published(study.id());
        lastReportMillis = System.currentTimeMillis();
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
