package dev.bracket.demo;

import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.Producer;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.errors.TimeoutException;
import org.apache.kafka.common.serialization.StringSerializer;

import java.time.Clock;
import java.time.Duration;
import java.util.Properties;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicBoolean;
import java.util.concurrent.atomic.AtomicLong;
import java.util.concurrent.atomic.AtomicReference;
import java.util.concurrent.locks.LockSupport;
import java.util.function.BooleanSupplier;

/**
 * Sends a feed to a topic at a steady rate until the feed ends, a count or duration is reached,
 * or the caller asks it to stop. Runs on the calling thread; the counters may be read from others.
 */
public final class DemoProducer {

    /**
     * When to stop, whichever comes first; {@code 0} / {@code null} means no such limit.
     *
     * @param count    records to send
     * @param duration how long to send
     */
    public record Limits(long count, Duration duration) {
        public static final Limits NONE = new Limits(0, null);
    }

    /** Longest wait for the brokers before a record counts as failed: a send, a delivery attempt. */
    public static final Duration ANSWER_TIMEOUT = Duration.ofSeconds(10);

    private final Producer<String, String> producer;
    private final String topic;
    private final double rate;
    private final Clock clock;
    private final AtomicLong sent = new AtomicLong();
    private final AtomicLong acknowledged = new AtomicLong();
    private final AtomicLong failed = new AtomicLong();
    private final AtomicReference<Exception> firstFailure = new AtomicReference<>();
    private final AtomicBoolean unanswered = new AtomicBoolean();

    /**
     * @param rate records per second; 0 sends as fast as the producer accepts them
     */
    public DemoProducer(Producer<String, String> producer, String topic, double rate, Clock clock) {
        if (!(rate >= 0) || Double.isInfinite(rate)) {
            throw new IllegalArgumentException("rate must be a finite number >= 0, was " + rate);
        }
        this.producer = producer;
        this.topic = topic;
        this.rate = rate;
        this.clock = clock;
    }

    /**
     * Producer settings for the outcomes topic: strings, acknowledged by all replicas, small
     * batches; brokers that do not answer fail a record within {@link #ANSWER_TIMEOUT} (waiting
     * for metadata or for a request) and within three times that in all.
     */
    public static Properties kafkaProperties(String bootstrapServers) {
        Properties p = new Properties();
        p.put(ProducerConfig.BOOTSTRAP_SERVERS_CONFIG, bootstrapServers);
        p.put(ProducerConfig.CLIENT_ID_CONFIG, "bracket-demo-producer");
        p.put(ProducerConfig.ACKS_CONFIG, "all");
        p.put(ProducerConfig.LINGER_MS_CONFIG, 20);
        p.put(ProducerConfig.BATCH_SIZE_CONFIG, 256 * 1024);
        int answerMillis = (int) ANSWER_TIMEOUT.toMillis();
        p.put(ProducerConfig.MAX_BLOCK_MS_CONFIG, answerMillis);
        p.put(ProducerConfig.REQUEST_TIMEOUT_MS_CONFIG, answerMillis);
        p.put(ProducerConfig.DELIVERY_TIMEOUT_MS_CONFIG, 3 * answerMillis);
        p.put(ProducerConfig.KEY_SERIALIZER_CLASS_CONFIG, StringSerializer.class.getName());
        p.put(ProducerConfig.VALUE_SERIALIZER_CLASS_CONFIG, StringSerializer.class.getName());
        return p;
    }

    public static Producer<String, String> kafkaProducer(String bootstrapServers) {
        return new KafkaProducer<>(kafkaProperties(bootstrapServers));
    }

    /**
     * Sends until a limit or the end of the feed, then flushes. Records are paced on a fixed
     * schedule (record i at start + i / rate), so a slow moment is caught up afterwards. Stops
     * early when the brokers stop answering (see {@link #unanswered()}).
     */
    public void run(EventFeed feed, Limits limits, BooleanSupplier stopRequested) {
        long startNanos = System.nanoTime();
        long deadline = limits.duration() == null ? Long.MAX_VALUE : startNanos + limits.duration().toNanos();
        long i = 0;
        while (!stopRequested.getAsBoolean() && !unanswered.get() && (limits.count() == 0 || i < limits.count())) {
            long now = System.nanoTime();
            if (now >= deadline) {
                break;
            }
            if (rate > 0) {
                long due = startNanos + (long) (i * 1e9 / rate);
                if (due > now) {
                    LockSupport.parkNanos(Math.min(due - now, TimeUnit.MILLISECONDS.toNanos(50)));
                    continue;
                }
            }
            EventFeed.KeyedLine line = feed.next(clock.instant());
            if (line == null) {
                break;
            }
            producer.send(new ProducerRecord<>(topic, line.key(), line.value()), (meta, e) -> {
                if (e == null) {
                    acknowledged.incrementAndGet();
                } else {
                    failed.incrementAndGet();
                    firstFailure.compareAndSet(null, e);
                    if (e instanceof TimeoutException) {
                        unanswered.set(true);
                    }
                }
            });
            sent.incrementAndGet();
            i++;
        }
        producer.flush();
    }

    /** Records handed to the producer so far. */
    public long sent() {
        return sent.get();
    }

    /** Records the broker acknowledged. */
    public long acknowledged() {
        return acknowledged.get();
    }

    /** Records the broker did not take. */
    public long failed() {
        return failed.get();
    }

    /** Whether a record failed because the brokers did not answer in time; sending then stops. */
    public boolean unanswered() {
        return unanswered.get();
    }

    /** The first send failure, if any. */
    public Exception firstFailure() {
        return firstFailure.get();
    }
}
