package dev.bracket.app;

import dev.bracket.alerts.delivery.AlertLedger;
import dev.bracket.alerts.delivery.KafkaAlertSink;
import dev.bracket.config.BracketConfig;
import dev.bracket.config.InputTopic;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.admin.NewTopic;
import org.apache.kafka.clients.admin.TopicDescription;
import org.apache.kafka.common.config.TopicConfig;
import org.apache.kafka.common.errors.TopicExistsException;
import org.apache.kafka.common.errors.UnknownTopicOrPartitionException;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.concurrent.ExecutionException;
import java.util.concurrent.TimeUnit;

/**
 * Creates the topics the monitor needs when they do not exist: the input and rejected topics, and
 * the bounds, partials, alerts and alert ledger topics with
 * {@code cleanup.policy=compact} (only the latest value per key matters). Existing topics are left as they are.
 */
public final class TopicSetup {

    private TopicSetup() {
    }

    /** Ensures every topic exists and returns the partials topic's partition count. */
    public static int ensureTopics(Admin admin, BracketConfig config) {
        Map<String, Map<String, String>> wanted = new LinkedHashMap<>();
        for (InputTopic in : config.inputs()) {
            wanted.put(in.topic(), Map.of());
        }
        wanted.put(config.topics().rejected(), Map.of());
        // Compacted: a study is republished only when its numbers change, so a quiet study's latest document must outlive retention.
        wanted.put(config.topics().bounds(), Map.of(TopicConfig.CLEANUP_POLICY_CONFIG, TopicConfig.CLEANUP_POLICY_COMPACT));
        wanted.put(config.topics().partials(), Map.of(TopicConfig.CLEANUP_POLICY_CONFIG, TopicConfig.CLEANUP_POLICY_COMPACT));
        // Alert state and the transitions webhooks may still owe (dev.bracket.alerts.AlertHistory).
        wanted.put(config.alerts().topic(), KafkaAlertSink.TOPIC_CONFIG);
        // What each webhook endpoint took and each study's last event time (dev.bracket.alerts.delivery.AlertLedger).
        wanted.put(AlertLedger.topicFor(config.alerts().topic()),
                Map.of(TopicConfig.CLEANUP_POLICY_CONFIG, TopicConfig.CLEANUP_POLICY_COMPACT));
        try {
            Map<String, TopicDescription> existing = describe(admin, wanted.keySet());
            List<NewTopic> create = new ArrayList<>();
            wanted.forEach((name, topicConfig) -> {
                if (!existing.containsKey(name)) {
                    short rf = config.topics().replicationFactor();
                    create.add(new NewTopic(name, Optional.of(config.topics().partitions()),
                            rf < 0 ? Optional.empty() : Optional.of(rf)).configs(topicConfig));
                }
            });
            for (NewTopic t : create) {
                try {
                    admin.createTopics(List.of(t)).all().get(60, TimeUnit.SECONDS);
                } catch (ExecutionException e) {
                    if (!(e.getCause() instanceof TopicExistsException)) {
                        throw new IllegalStateException("cannot create topic '" + t.name() + "': " + e.getCause().getMessage(), e);
                    }
                }
            }
            // A topic just created may take a moment to appear in metadata.
            String name = config.topics().partials();
            TopicDescription partials = existing.get(name);
            long deadline = System.nanoTime() + TimeUnit.SECONDS.toNanos(30);
            while (partials == null) {
                if (System.nanoTime() > deadline) {
                    throw new IllegalStateException("partials topic '" + name + "' does not appear after creation");
                }
                Thread.sleep(100);
                partials = describe(admin, List.of(name)).get(name);
            }
            return partials.partitions().size();
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            throw new IllegalStateException("interrupted while setting up topics", e);
        } catch (ExecutionException | java.util.concurrent.TimeoutException e) {
            throw new IllegalStateException("cannot reach Kafka to set up topics: " + e.getMessage(), e);
        }
    }

    private static Map<String, TopicDescription> describe(Admin admin, java.util.Collection<String> names)
            throws InterruptedException, ExecutionException, java.util.concurrent.TimeoutException {
        Map<String, TopicDescription> out = new LinkedHashMap<>();
        for (var e : admin.describeTopics(names).topicNameValues().entrySet()) {
            try {
                out.put(e.getKey(), e.getValue().get(60, TimeUnit.SECONDS));
            } catch (ExecutionException ex) {
                if (!(ex.getCause() instanceof UnknownTopicOrPartitionException)) {
                    throw ex;
                }
            }
        }
        return out;
    }
}
