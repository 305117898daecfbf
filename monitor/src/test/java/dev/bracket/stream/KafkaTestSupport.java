package dev.bracket.stream;

import dev.bracket.broker.EmbeddedBroker;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.serialization.ByteArrayDeserializer;
import org.apache.kafka.common.serialization.ByteArraySerializer;

import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicReference;

/** Clients for tests against a broker started by the test class. */
final class KafkaTestSupport {

    private KafkaTestSupport() {
    }

    static KafkaProducer<byte[], byte[]> producer(EmbeddedBroker broker) {
        return new KafkaProducer<>(Map.of(
                ProducerConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers(),
                ProducerConfig.ENABLE_IDEMPOTENCE_CONFIG, true,
                ProducerConfig.ACKS_CONFIG, "all",
                ProducerConfig.LINGER_MS_CONFIG, 10),
                new ByteArraySerializer(), new ByteArraySerializer());
    }

    /**
     * Sends {@code records} at about {@code perSecond} (so that faults injected meanwhile land
     * mid-stream), then flushes; the first send error goes to {@code failure}.
     */
    static void producePaced(EmbeddedBroker broker, List<ProducerRecord<byte[], byte[]>> records, int perSecond,
                             AtomicReference<Throwable> failure) {
        try (KafkaProducer<byte[], byte[]> producer = producer(broker)) {
            long start = System.nanoTime();
            long nanosEach = 1_000_000_000L / perSecond;
            int n = 0;
            for (ProducerRecord<byte[], byte[]> r : records) {
                producer.send(r, (md, ex) -> {
                    if (ex != null) {
                        failure.compareAndSet(null, ex);
                    }
                });
                if (++n % 400 == 0) {
                    long wait = start + n * nanosEach - System.nanoTime();
                    if (wait > 0) {
                        TimeUnit.NANOSECONDS.sleep(wait); // pacing the producer, not waiting for a condition
                    }
                }
            }
            producer.flush();
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        } catch (RuntimeException e) {
            failure.compareAndSet(null, e);
        }
    }

    /** Every record of a topic now visible to a read_committed reader. */
    static List<ConsumerRecord<byte[], byte[]>> readAll(EmbeddedBroker broker, String topic) {
        return readAll(broker.bootstrapServers(), topic);
    }

    /** Every record of a topic now visible to a read_committed reader (records of up to 4 MiB). */
    static List<ConsumerRecord<byte[], byte[]>> readAll(String bootstrapServers, String topic) {
        try (KafkaConsumer<byte[], byte[]> c = new KafkaConsumer<>(Map.of(
                ConsumerConfig.BOOTSTRAP_SERVERS_CONFIG, bootstrapServers,
                ConsumerConfig.ISOLATION_LEVEL_CONFIG, "read_committed",
                ConsumerConfig.MAX_PARTITION_FETCH_BYTES_CONFIG, 4 << 20,
                ConsumerConfig.ENABLE_AUTO_COMMIT_CONFIG, false),
                new ByteArrayDeserializer(), new ByteArrayDeserializer())) {
            List<TopicPartition> tps = c.partitionsFor(topic).stream().map(p -> new TopicPartition(topic, p.partition())).toList();
            c.assign(tps);
            c.seekToBeginning(tps);
            Map<TopicPartition, Long> end = c.endOffsets(tps);
            List<ConsumerRecord<byte[], byte[]>> out = new ArrayList<>();
            long deadline = System.nanoTime() + Duration.ofSeconds(60).toNanos();
            while (tps.stream().anyMatch(tp -> c.position(tp) < end.get(tp)) && System.nanoTime() < deadline) {
                c.poll(Duration.ofMillis(200)).forEach(out::add);
            }
            return out;
        }
    }
}
