package dev.bracket.alerts.delivery;

import dev.bracket.alerts.AlertKey;
import dev.bracket.alerts.AlertState;
import dev.bracket.alerts.AlertText;
import org.apache.kafka.clients.consumer.Consumer;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.common.PartitionInfo;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.serialization.StringDeserializer;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

/**
 * Restores alert state at start by reading the alerts topic from the beginning to its end (the
 * end offsets at the time of the call). The newest transition of each key leaves the key's
 * state ({@link AlertState#after}); given to {@link AlertEvaluator#restore}, a restarted monitor
 * neither fires again what already fired nor forgets to resolve it. The recent transitions
 * themselves are what webhooks resume delivering (see {@link AlertLedger}).
 */
public final class AlertHistory {

    private static final Logger LOG = LoggerFactory.getLogger(AlertHistory.class);

    private AlertHistory() {
    }

    /**
     * What the alerts topic tells a starting monitor: each key's state, and the transitions
     * raised at or after a given time (oldest first), which webhooks may still owe their receivers.
     */
    public record Restored(List<AlertState> states, List<AlertDocument> since) {
        public Restored {
            states = List.copyOf(states);
            since = List.copyOf(since);
        }
    }

    /**
     * Reads the topic with a consumer of its own (no consumer group: nothing is committed).
     *
     * @param clientProperties the configuration's Kafka client properties, passed on verbatim
     *                         except for what this reader needs
     * @param since            transitions raised at or after this time are returned whole
     */
    public static Restored read(Map<String, String> clientProperties, String topic, Duration timeout, Instant since) {
        try (KafkaConsumer<String, String> consumer = reader(clientProperties, "bracket-alerts-restore")) {
            return read(consumer, topic, timeout, since);
        }
    }

    /** A consumer for reading a topic to its end: no group, nothing committed, committed records only. */
    static KafkaConsumer<String, String> reader(Map<String, String> clientProperties, String clientId) {
        Map<String, Object> p = new HashMap<>(clientProperties);
        p.remove(ConsumerConfig.GROUP_ID_CONFIG);
        p.remove(ConsumerConfig.GROUP_INSTANCE_ID_CONFIG);
        p.put(ConsumerConfig.CLIENT_ID_CONFIG, clientId);
        p.put(ConsumerConfig.ENABLE_AUTO_COMMIT_CONFIG, false);
        p.put(ConsumerConfig.ISOLATION_LEVEL_CONFIG, "read_committed");
        // Looking for the topic must not create it: it has to be compacted (see KafkaAlertSink.topic).
        p.put(ConsumerConfig.ALLOW_AUTO_CREATE_TOPICS_CONFIG, false);
        return new KafkaConsumer<>(p, new StringDeserializer(), new StringDeserializer());
    }

    /**
     * Reads every partition of {@code topic} to its end offset. A topic that does not exist yet
     * holds no state. Records that are not alert documents are logged and skipped.
     *
     * @throws IllegalStateException when the end is not reached within {@code timeout}: starting
     *                               with part of the state could fire alerts again
     */
    public static Restored read(Consumer<String, String> consumer, String topic, Duration timeout, Instant since) {
        List<ConsumerRecord<String, String>> records = readToEnd(consumer, topic, timeout);
        Map<AlertKey, AlertState> states = new HashMap<>();
        List<AlertDocument> recent = new ArrayList<>();
        int skipped = 0;
        for (ConsumerRecord<String, String> r : records) {
            if (r.value() == null) {
                continue; // a tombstone: compaction's deletion marker, no state
            }
            try {
                AlertDocument d = AlertJson.document(r.value());
                states.merge(d.key(), d.state(), (a, b) -> b.sequence() > a.sequence() ? b : a);
                if (!d.at().isBefore(since)) {
                    recent.add(d);
                }
            } catch (IllegalArgumentException e) {
                skipped++;
                LOG.warn("alerts topic {} partition {} offset {}: skipped, {}", topic, r.partition(), r.offset(), e.getMessage());
            }
        }
        // Partitions interleave in no particular order; a key's transitions are in order within its partition.
        recent.sort(Comparator.comparing(AlertDocument::at).thenComparing(d -> d.key().toString())
                .thenComparingLong(AlertDocument::sequence));
        LOG.info("restored {} alert states ({} firing) from {} records of {}{}", states.size(),
                states.values().stream().filter(AlertState::firing).count(), records.size(), topic,
                skipped == 0 ? "" : "; skipped " + skipped + " unreadable records");
        return new Restored(List.copyOf(states.values()), recent);
    }

    /**
     * Every record of {@code topic} up to the end offsets at the time of the call; none when the
     * topic does not exist.
     *
     * @throws IllegalStateException when the end is not reached within {@code timeout}
     */
    static List<ConsumerRecord<String, String>> readToEnd(Consumer<String, String> consumer, String topic, Duration timeout) {
        List<PartitionInfo> infos = consumer.partitionsFor(topic, timeout);
        if (infos == null || infos.isEmpty()) {
            LOG.info("topic {} does not exist yet: nothing to restore from it", topic);
            return List.of();
        }
        List<TopicPartition> partitions = infos.stream().map(i -> new TopicPartition(topic, i.partition())).toList();
        consumer.assign(partitions);
        consumer.seekToBeginning(partitions);
        Map<TopicPartition, Long> end = consumer.endOffsets(partitions, timeout);
        long deadline = System.nanoTime() + timeout.toNanos();
        List<ConsumerRecord<String, String>> records = new ArrayList<>();
        while (!reachedEnd(consumer, end)) {
            if (System.nanoTime() - deadline > 0) {
                throw new IllegalStateException("could not read topic " + topic + " to its end within "
                        + AlertText.duration(timeout) + "; not starting with partial alert state (check the broker)");
            }
            consumer.poll(Duration.ofMillis(200)).forEach(records::add);
        }
        return records;
    }

    private static boolean reachedEnd(Consumer<String, String> consumer, Map<TopicPartition, Long> end) {
        return end.entrySet().stream().allMatch(e -> consumer.position(e.getKey()) >= e.getValue());
    }
}
