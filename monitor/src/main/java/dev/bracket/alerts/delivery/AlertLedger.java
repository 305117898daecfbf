package dev.bracket.alerts.delivery;

import dev.bracket.alerts.AlertText;
import dev.bracket.alerts.WebhookTarget;
import dev.bracket.alerts.AlertKey;
import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.node.ObjectNode;
import dev.bracket.report.render.ReportJson;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.admin.NewTopic;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.clients.producer.Producer;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.config.TopicConfig;
import org.apache.kafka.common.errors.TopicExistsException;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.time.Instant;
import java.time.format.DateTimeParseException;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.UUID;
import java.util.concurrent.ExecutionException;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.TimeoutException;

/**
 * What alerting must remember across restarts besides the transitions themselves, kept in a
 * compacted topic of its own ({@code <alerts topic>-ledger}):
 * <ul>
 *   <li>{@code webhook|<endpoint id>|<alert key>}: the newest transition of that key the
 *       endpoint is done with (acknowledged with 2xx, refused, or given up after
 *       {@code retry-for}). One delivery thread per endpoint takes a key's transitions in order,
 *       so every earlier transition of the key is done too. Written after the receiver answered:
 *       a crash in between makes the next start deliver it again, under the same idempotency key.</li>
 *   <li>{@code last-event|<study>}: when the study's last event arrived (the monitor's first start
 *       if none has), so that a restart judges a stall from it and not from the process start.</li>
 * </ul>
 * The endpoint id is a name-based UUID of the full URL (query included), so no token or query
 * text appears in the topic. Without a Kafka cluster ({@link #inMemory}) nothing is restored and
 * nothing survives the process. Writes are asynchronous; a failed one is logged, and its only
 * cost is a repeated delivery or a stall judged from an older time after the next restart.
 * Thread-safe.
 */
public final class AlertLedger implements AutoCloseable {

    private static final Logger LOG = LoggerFactory.getLogger(AlertLedger.class);
    private static final ObjectMapper MAPPER = ReportJson.mapper();
    private static final String WEBHOOK = "webhook|";
    private static final String LAST_EVENT = "last-event|";

    /** The newest transition of one key an endpoint is done with. */
    private record Done(Instant origin, long sequence) {
        /** Whether this covers {@code d}: the same run of the key up to its sequence, or a later run. */
        boolean covers(AlertDocument d) {
            return origin.equals(d.origin()) ? d.sequence() <= sequence : origin.isAfter(d.origin());
        }
    }

    private final Producer<String, String> producer;
    private final String topic;
    /** Client properties and timeout for reading the topic again ({@link #reread}); null in memory. */
    private final Map<String, String> clientProperties;
    private final Duration timeout;
    private final Map<String, Done> done = new HashMap<>();
    private final Map<String, Instant> lastEvents = new HashMap<>();

    private AlertLedger(Producer<String, String> producer, String topic, Map<String, String> clientProperties,
                        Duration timeout) {
        this.producer = producer;
        this.topic = topic;
        this.clientProperties = clientProperties;
        this.timeout = timeout;
    }

    /** A ledger that remembers nothing beyond the process (no Kafka cluster for alerts). */
    public static AlertLedger inMemory() {
        return new AlertLedger(null, null, null, null);
    }

    /** The ledger topic of an alerts topic. */
    public static String topicFor(String alertsTopic) {
        return alertsTopic + "-ledger";
    }

    /**
     * Creates the ledger topic if missing (the monitor's topic setup normally has, with the
     * configured partitions and replication; this one has one partition and the broker's default
     * replication), reads it to its end, and opens a producer for new entries.
     *
     * @throws IllegalStateException when the topic cannot be created or read within {@code timeout}
     */
    public static AlertLedger open(Map<String, String> clientProperties, String topic, Duration timeout) {
        create(clientProperties, topic, timeout);
        AlertLedger ledger = new AlertLedger(KafkaAlertSink.producer(clientProperties, "bracket-alerts-ledger"), topic,
                clientProperties, timeout);
        try {
            ledger.reread();
        } catch (RuntimeException e) {
            ledger.close();
            throw e;
        }
        return ledger;
    }

    /**
     * Reads the topic to its end again, taking in what other instances recorded since (a study
     * taken over from another instance: its webhook positions and last event time). Does nothing
     * in memory.
     *
     * @throws IllegalStateException when the topic cannot be read within the timeout given at open
     */
    public void reread() {
        if (clientProperties == null) {
            return;
        }
        try (KafkaConsumer<String, String> consumer = AlertHistory.reader(clientProperties, "bracket-alerts-ledger-restore")) {
            restore(AlertHistory.readToEnd(consumer, topic, timeout));
        }
    }

    private static void create(Map<String, String> clientProperties, String topic, Duration timeout) {
        try (Admin admin = Admin.create(new HashMap<>(clientProperties))) {
            NewTopic t = new NewTopic(topic, Optional.of(1), Optional.empty())
                    .configs(Map.of(TopicConfig.CLEANUP_POLICY_CONFIG, TopicConfig.CLEANUP_POLICY_COMPACT));
            admin.createTopics(List.of(t)).all().get(timeout.toMillis(), TimeUnit.MILLISECONDS);
        } catch (ExecutionException e) {
            if (!(e.getCause() instanceof TopicExistsException)) {
                throw new IllegalStateException("cannot create the alert ledger topic '" + topic + "': "
                        + e.getCause().getMessage(), e);
            }
        } catch (TimeoutException e) {
            throw new IllegalStateException("cannot create the alert ledger topic '" + topic + "' within "
                    + AlertText.duration(timeout) + " (check the broker)", e);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            throw new IllegalStateException("interrupted while creating the alert ledger topic", e);
        }
    }

    private synchronized void restore(List<ConsumerRecord<String, String>> records) {
        int skipped = 0;
        for (ConsumerRecord<String, String> r : records) {
            if (r.key() == null || r.value() == null) {
                continue;
            }
            try {
                JsonNode o = MAPPER.readTree(r.value());
                if (r.key().startsWith(WEBHOOK)) {
                    done.put(r.key(), new Done(Instant.parse(o.path("origin").asText()), o.path("sequence").asLong()));
                } else if (r.key().startsWith(LAST_EVENT)) {
                    lastEvents.put(r.key().substring(LAST_EVENT.length()), Instant.parse(o.path("at").asText()));
                } else {
                    skipped++;
                }
            } catch (JsonProcessingException | DateTimeParseException e) {
                skipped++;
            }
        }
        LOG.info("alert ledger {}: {} webhook positions, {} last-event times{}", topic, done.size(), lastEvents.size(),
                skipped == 0 ? "" : "; skipped " + skipped + " unreadable records");
    }

    /** Whether entries survive the process. */
    public boolean durable() {
        return producer != null;
    }

    private static String webhookKey(WebhookTarget target, AlertKey key) {
        String endpoint = UUID.nameUUIDFromBytes(target.url().toString().getBytes(StandardCharsets.UTF_8)).toString();
        return WEBHOOK + endpoint + "|" + key;
    }

    /** Whether the endpoint is done with this transition (as recorded here). */
    public synchronized boolean delivered(WebhookTarget target, AlertDocument d) {
        Done mine = done.get(webhookKey(target, d.key()));
        return mine != null && mine.covers(d);
    }

    /** Records that the endpoint is done with this transition (and so with every earlier one of its key). */
    public void recordDelivered(WebhookTarget target, AlertDocument d) {
        String key = webhookKey(target, d.key());
        synchronized (this) {
            done.put(key, new Done(d.origin(), d.sequence()));
        }
        ObjectNode o = MAPPER.createObjectNode();
        o.put("endpoint", target.endpoint());
        o.put("key", d.key().toString());
        o.put("transitionId", d.transitionId());
        o.put("origin", d.origin().toString());
        o.put("sequence", d.sequence());
        write(key, o);
    }

    /** When each study's last event arrived, as recorded here or read from the topic. */
    public synchronized Map<String, Instant> lastEvents() {
        return Map.copyOf(lastEvents);
    }

    /** Records when a study's last event arrived; written only when it changed. */
    public void recordLastEvent(String study, Instant at) {
        synchronized (this) {
            if (at.equals(lastEvents.put(study, at))) {
                return;
            }
        }
        ObjectNode o = MAPPER.createObjectNode();
        o.put("study", study);
        o.put("at", at.toString());
        write(LAST_EVENT + study, o);
    }

    private void write(String key, ObjectNode value) {
        if (producer == null) {
            return;
        }
        producer.send(new ProducerRecord<>(topic, key, value.toString()), (metadata, error) -> {
            if (error != null) {
                LOG.warn("alert ledger {} did not take {}: {}; after a restart this may be delivered or judged again",
                        topic, key, error.toString());
            }
        });
    }

    /** Waits for outstanding writes and closes the producer. */
    @Override
    public void close() {
        if (producer != null) {
            producer.flush();
            producer.close();
        }
    }
}
