package dev.bracket.alerts.delivery;

import dev.bracket.alerts.AlertTransition;
import io.micrometer.core.instrument.Counter;
import io.micrometer.core.instrument.MeterRegistry;
import org.apache.kafka.clients.admin.NewTopic;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.Producer;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.config.TopicConfig;
import org.apache.kafka.common.serialization.StringSerializer;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.util.HashMap;
import java.util.Map;
import java.util.Optional;

/**
 * Writes each transition's document to the alerts topic, keyed {@code study/assumptions/window/rule}
 * (so one key's transitions share a partition and keep their order), with the transition id in
 * the record header {@value #TRANSITION_ID_HEADER}. The topic is compacted: the newest transition
 * per key is the key's state, which {@link AlertHistory} reads back at start; the transitions of
 * the last {@link #KEPT_WHOLE} are all kept, for webhooks to resume from.
 *
 * <p>The producer is idempotent with {@code acks=all}: a retried send does not duplicate a
 * record. A send that still fails is logged and counted ({@code bracket.alerts.kafka.failures});
 * the alert still reached the other sinks, and a restart may then fire it again (at least once).
 */
public final class KafkaAlertSink implements AlertSink {

    public static final String TRANSITION_ID_HEADER = "bracket-transition-id";

    private static final Logger LOG = LoggerFactory.getLogger(KafkaAlertSink.class);

    private final Producer<String, String> producer;
    private final String topic;
    private final boolean ownsProducer;
    private final Counter failures;

    /** A sink on a producer the caller owns (and closes). */
    public KafkaAlertSink(Producer<String, String> producer, String topic, MeterRegistry registry) {
        this(producer, topic, registry, false);
    }

    private KafkaAlertSink(Producer<String, String> producer, String topic, MeterRegistry registry, boolean ownsProducer) {
        this.producer = producer;
        this.topic = topic;
        this.ownsProducer = ownsProducer;
        this.failures = Counter.builder("bracket.alerts.kafka.failures").description("alert records the broker did not take")
                .register(registry);
    }

    /**
     * A sink with its own idempotent producer, closed with the sink.
     *
     * @param clientProperties the configuration's Kafka client properties (bootstrap servers,
     *                         security, …), passed on verbatim except for what this producer needs
     */
    public static KafkaAlertSink connect(Map<String, String> clientProperties, String topic, MeterRegistry registry) {
        return new KafkaAlertSink(producer(clientProperties, "bracket-alerts"), topic, registry, true);
    }

    /** An idempotent producer with {@code acks=all} for alert records, on the configuration's client properties. */
    static KafkaProducer<String, String> producer(Map<String, String> clientProperties, String clientId) {
        Map<String, Object> p = new HashMap<>(clientProperties);
        p.remove(ProducerConfig.TRANSACTIONAL_ID_CONFIG);
        p.put(ProducerConfig.CLIENT_ID_CONFIG, clientId);
        p.put(ProducerConfig.ACKS_CONFIG, "all");
        p.put(ProducerConfig.ENABLE_IDEMPOTENCE_CONFIG, true);
        // send() blocks while the broker is unknown; alerts must not hold the bound updater for a minute.
        p.put(ProducerConfig.MAX_BLOCK_MS_CONFIG, 10_000);
        return new KafkaProducer<>(p, new StringSerializer(), new StringSerializer());
    }

    /** How long every transition stays in the alerts topic before compaction may remove it. */
    public static final Duration KEPT_WHOLE = Duration.ofDays(7);

    /**
     * The alerts topic's configuration: compacted (the newest transition per key is all the alert
     * state a restart needs), never deleted by age, and no transition compacted away within
     * {@link #KEPT_WHOLE} of being written, so webhooks can resume delivering every transition of
     * their {@code retry-for} in order after a restart.
     */
    public static final Map<String, String> TOPIC_CONFIG = Map.of(
            TopicConfig.CLEANUP_POLICY_CONFIG, TopicConfig.CLEANUP_POLICY_COMPACT,
            TopicConfig.MIN_COMPACTION_LAG_MS_CONFIG, Long.toString(KEPT_WHOLE.toMillis()));

    /** The alerts topic as it should be created (see {@link #TOPIC_CONFIG}). */
    public static NewTopic topic(String name, int partitions, short replication) {
        return new NewTopic(name, Optional.of(partitions), Optional.of(replication)).configs(TOPIC_CONFIG);
    }

    @Override
    public String name() {
        return "kafka";
    }

    @Override
    public void accept(AlertTransition t) {
        ProducerRecord<String, String> record = new ProducerRecord<>(topic, t.key().toString(), AlertJson.toText(t));
        record.headers().add(TRANSITION_ID_HEADER, t.transitionId().getBytes(StandardCharsets.UTF_8));
        producer.send(record, (metadata, error) -> {
            if (error != null) {
                failures.increment();
                LOG.error("alerts topic {} did not take transition {} ({} {} of {}): {}", topic, t.transitionId(),
                        t.kind().id(), t.sequence(), t.key(), error.toString());
            }
        });
    }

    /** Waits for outstanding sends; closes the producer if the sink created it. */
    @Override
    public void close() {
        producer.flush();
        if (ownsProducer) {
            producer.close();
        }
    }
}
