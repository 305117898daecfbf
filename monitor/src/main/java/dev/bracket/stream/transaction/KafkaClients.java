package dev.bracket.stream.transaction;

import dev.bracket.config.BracketConfig;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.common.serialization.ByteArrayDeserializer;
import org.apache.kafka.common.serialization.ByteBufferDeserializer;
import org.apache.kafka.common.serialization.ByteArraySerializer;

import java.nio.ByteBuffer;
import java.util.HashMap;
import java.util.Map;

/**
 * Builds the Kafka clients from the configuration's {@code kafka:} properties, which are passed
 * verbatim (security, timeouts, tuning). Defaults fill what the user left out; the settings
 * exactly-once depends on (isolation, manual commits, idempotence, transactional id) always win.
 */
public final class KafkaClients {

    private final BracketConfig config;

    public KafkaClients(BracketConfig config) {
        this.config = config;
    }

    public BracketConfig config() {
        return config;
    }

    public Admin admin() {
        return Admin.create(new HashMap<>(config.kafka()));
    }

    /**
     * The group member that reads input topics; commits go through the transactional producer.
     * Keys and values are views into the fetched bytes ({@link ByteBufferDeserializer} hands them
     * over without the copy {@link ByteArrayDeserializer} makes of every record), valid until the
     * next poll.
     */
    public KafkaConsumer<ByteBuffer, ByteBuffer> groupConsumer() {
        Map<String, Object> p = base();
        p.putIfAbsent(ConsumerConfig.AUTO_OFFSET_RESET_CONFIG, "earliest");
        if (!"consumer".equalsIgnoreCase(String.valueOf(p.get(ConsumerConfig.GROUP_PROTOCOL_CONFIG)))) {
            // Moves only the partitions that change owner; the others keep their in-memory panes.
            p.putIfAbsent(ConsumerConfig.PARTITION_ASSIGNMENT_STRATEGY_CONFIG,
                    "org.apache.kafka.clients.consumer.CooperativeStickyAssignor");
        }
        p.put(ConsumerConfig.GROUP_ID_CONFIG, config.group());
        p.put(ConsumerConfig.ENABLE_AUTO_COMMIT_CONFIG, false);
        p.put(ConsumerConfig.ISOLATION_LEVEL_CONFIG, "read_committed");
        return new KafkaConsumer<>(p, new ByteBufferDeserializer(), new ByteBufferDeserializer());
    }

    /**
     * A member of the updater group ({@code GROUP-updaters}) reading the partials topic: the group
     * protocol hands each partials partition, and with it each study, to exactly one live
     * instance. Nothing is committed (an owner reads its partitions from the beginning).
     */
    public KafkaConsumer<byte[], byte[]> updaterConsumer() {
        Map<String, Object> p = base();
        if (!"consumer".equalsIgnoreCase(String.valueOf(p.get(ConsumerConfig.GROUP_PROTOCOL_CONFIG)))) {
            // A joining instance takes partitions over without every owner pausing.
            p.putIfAbsent(ConsumerConfig.PARTITION_ASSIGNMENT_STRATEGY_CONFIG,
                    "org.apache.kafka.clients.consumer.CooperativeStickyAssignor");
        }
        p.remove(ConsumerConfig.GROUP_INSTANCE_ID_CONFIG);
        p.put(ConsumerConfig.GROUP_ID_CONFIG, updaterGroup());
        p.put(ConsumerConfig.CLIENT_ID_CONFIG, "bracket-updater-" + config.instance());
        p.put(ConsumerConfig.ENABLE_AUTO_COMMIT_CONFIG, false);
        p.put(ConsumerConfig.ISOLATION_LEVEL_CONFIG, "read_committed");
        p.put(ConsumerConfig.AUTO_OFFSET_RESET_CONFIG, "earliest");
        return new KafkaConsumer<>(p, new ByteArrayDeserializer(), new ByteArrayDeserializer());
    }

    /** The consumer group whose members own studies: {@code GROUP-updaters}. */
    public String updaterGroup() {
        return config.group() + "-updaters";
    }

    /** A consumer outside any group that reads committed records only (partials restore, updater). */
    public KafkaConsumer<byte[], byte[]> committedReader() {
        Map<String, Object> p = base();
        p.remove(ConsumerConfig.GROUP_ID_CONFIG);
        p.remove(ConsumerConfig.GROUP_INSTANCE_ID_CONFIG);
        p.put(ConsumerConfig.ENABLE_AUTO_COMMIT_CONFIG, false);
        p.put(ConsumerConfig.ISOLATION_LEVEL_CONFIG, "read_committed");
        p.put(ConsumerConfig.AUTO_OFFSET_RESET_CONFIG, "earliest");
        return new KafkaConsumer<>(p, new ByteArrayDeserializer(), new ByteArrayDeserializer());
    }

    /**
     * The producer of one aggregation member. Its transactional id is stable per (group, instance, member), so a
     * restarted instance aborts its predecessor's open transaction at once instead of waiting
     * for the transaction timeout.
     */
    public KafkaProducer<byte[], byte[]> transactionalProducer(int member) {
        Map<String, Object> p = base();
        p.putIfAbsent(ProducerConfig.TRANSACTION_TIMEOUT_CONFIG, 10_000);
        p.putIfAbsent(ProducerConfig.LINGER_MS_CONFIG, 5);
        p.put(ProducerConfig.TRANSACTIONAL_ID_CONFIG, transactionalId(member));
        p.put(ProducerConfig.ENABLE_IDEMPOTENCE_CONFIG, true);
        p.put(ProducerConfig.ACKS_CONFIG, "all");
        return new KafkaProducer<>(p, new ByteArraySerializer(), new ByteArraySerializer());
    }

    /** An idempotent producer without transactions (bound documents). */
    public KafkaProducer<byte[], byte[]> plainProducer() {
        Map<String, Object> p = base();
        p.remove(ProducerConfig.TRANSACTIONAL_ID_CONFIG);
        p.putIfAbsent(ProducerConfig.LINGER_MS_CONFIG, 5);
        p.put(ProducerConfig.ENABLE_IDEMPOTENCE_CONFIG, true);
        p.put(ProducerConfig.ACKS_CONFIG, "all");
        return new KafkaProducer<>(p, new ByteArraySerializer(), new ByteArraySerializer());
    }

    /** {@code bracket-GROUP-INSTANCE}, with {@code -N} for the instance's further members (group-members). */
    public String transactionalId(int member) {
        return "bracket-" + config.group() + "-" + config.instance() + (member == 0 ? "" : "-" + member);
    }

    private Map<String, Object> base() {
        return new HashMap<>(config.kafka());
    }
}
