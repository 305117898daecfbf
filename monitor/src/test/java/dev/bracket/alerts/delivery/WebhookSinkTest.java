package dev.bracket.alerts.delivery;

import dev.bracket.alerts.Snapshots;

import dev.bracket.alerts.WebhookTarget;
import dev.bracket.alerts.AlertTransition;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.net.URI;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;

import static org.assertj.core.api.Assertions.assertThat;
import static org.awaitility.Awaitility.await;

@DisplayName("Webhook sink against a real HTTP receiver")
class WebhookSinkTest {

    private final SimpleMeterRegistry registry = new SimpleMeterRegistry();
    private final Receiver receiver = new Receiver();
    private WebhookSink sink;

    @AfterEach
    void stop() {
        if (sink != null) {
            sink.close(Duration.ofMillis(100));
        }
        receiver.close();
    }

    private WebhookTarget target(Duration timeout, Duration retryFor, int queue, long initialMillis, long maxMillis) {
        return new WebhookTarget(URI.create(receiver.url()), "HOOK_TOKEN", timeout, retryFor, queue,
                Duration.ofMillis(initialMillis), Duration.ofMillis(maxMillis));
    }

    private double count(String meter) {
        var c = registry.find(meter).counter();
        return c == null ? 0 : c.count();
    }

    private double dropped(String reason) {
        var c = registry.find("bracket.webhook.dropped").tag("reason", reason).counter();
        return c == null ? 0 : c.count();
    }

    @Test
    @DisplayName("receiver down, then refusing, then back: every transition arrives once, in order per key, with token")
    void outageThenRecovery() throws Exception {
        sink = new WebhookSink(target(Duration.ofSeconds(2), Duration.ofSeconds(30), 100, 50, 400), registry,
                name -> name.equals("HOOK_TOKEN") ? "s3cret" : null);
        List<AlertTransition> a = Transitions.alternating(Transitions.key("rollout", "mts-negative"), 3);
        List<AlertTransition> b = Transitions.alternating(Transitions.key("rollout", "mtr-positive"), 1);
        List<AlertTransition> sent = new ArrayList<>(List.of(a.get(0), b.get(0), a.get(1), a.get(2)));
        sent.forEach(sink::accept);

        await().atMost(Duration.ofSeconds(10)).until(() -> count("bracket.webhook.failures") >= 3);
        assertThat(sink.pending()).as("nothing lost while the receiver is down").isEqualTo(4);
        assertThat(receiver.requests()).isEmpty();

        receiver.start(n -> n <= 2 ? 503 : 200);
        await().atMost(Duration.ofSeconds(15)).until(() -> receiver.uniqueDeliveries().size() == 4);

        assertThat(receiver.uniqueDeliveries()).containsExactlyElementsOf(sent.stream().map(AlertTransition::transitionId).toList());
        ObjectMapper json = new ObjectMapper();
        for (Receiver.Request r : receiver.requests()) {
            JsonNode doc = json.readTree(r.body());
            assertThat(doc.path("transitionId").asText()).isEqualTo(r.idempotencyKey());
            assertThat(doc.path("schema").asText()).isEqualTo(AlertJson.SCHEMA);
            assertThat(r.authorization()).isEqualTo("Bearer s3cret");
        }
        assertThat(receiver.requests().stream().filter(r -> r.status() == 200).count())
                .as("exactly one acknowledged delivery per transition").isEqualTo(4);
        assertThat(count("bracket.webhook.deliveries")).isEqualTo(4);
        assertThat(count("bracket.webhook.retries")).isGreaterThanOrEqualTo(3);
        assertThat(registry.find("bracket.webhook.dropped").counters()).isEmpty();
        assertThat(sink.pending()).isZero();
    }

    @Test
    @DisplayName("waits grow exponentially between attempts")
    void exponentialBackoff() throws Exception {
        receiver.start(n -> n <= 5 ? 503 : 200);
        sink = new WebhookSink(target(Duration.ofSeconds(2), Duration.ofSeconds(30), 10, 40, 5000), registry, name -> null);
        sink.accept(Transitions.alternating(Transitions.key("rollout", "mts-negative"), 1).get(0));
        await().atMost(Duration.ofSeconds(10)).until(() -> receiver.uniqueDeliveries().size() == 1);

        List<Receiver.Request> rs = receiver.requests();
        assertThat(rs).hasSize(6);
        assertThat(rs).extracting(Receiver.Request::authorization).containsOnlyNulls();
        // Nominal waits 40, 80, 160, 320, 640 ms, each within the ±20% jitter (Backoff); the upper
        // side gets 250 ms of scheduling slack on this 2-core machine.
        long nominal = 40;
        for (int i = 1; i < rs.size(); i++) {
            double gapMillis = (rs.get(i).arrivedNanos() - rs.get(i - 1).arrivedNanos()) / 1e6;
            assertThat(gapMillis).as("wait before attempt %d", i + 1)
                    .isBetween(0.8 * nominal - 1, 1.2 * nominal + 250);
            nominal *= 2;
        }
        assertThat(count("bracket.webhook.retries")).isEqualTo(5);
        assertThat(count("bracket.webhook.failures")).isEqualTo(5);
    }

    @Test
    @DisplayName("a request that times out on our side is retried under the same idempotency key")
    void timeoutRetriedWithSameKey() throws Exception {
        receiver.start(n -> 200, n -> n == 1 ? 1500 : 0);
        sink = new WebhookSink(target(Duration.ofMillis(300), Duration.ofSeconds(30), 10, 50, 400), registry, name -> null);
        AlertTransition t = Transitions.alternating(Transitions.key("rollout", "mts-negative"), 1).get(0);
        sink.accept(t);
        await().atMost(Duration.ofSeconds(10)).until(() -> receiver.requests().size() == 2);

        assertThat(receiver.requests()).extracting(Receiver.Request::idempotencyKey).containsOnly(t.transitionId());
        assertThat(receiver.uniqueDeliveries()).as("the receiver recognises one delivery").containsExactly(t.transitionId());
        assertThat(count("bracket.webhook.deliveries")).isEqualTo(1);
        assertThat(count("bracket.webhook.failures")).isEqualTo(1);
    }

    @Test
    @DisplayName("beyond the retry horizon a transition is dropped and counted")
    void givesUpAfterHorizon() {
        sink = new WebhookSink(target(Duration.ofSeconds(1), Duration.ofMillis(400), 10, 50, 100), registry, name -> null);
        sink.accept(Transitions.alternating(Transitions.key("rollout", "mts-negative"), 1).get(0));
        // The drop is counted just before the sender lets go of the transition: wait for both.
        await().atMost(Duration.ofSeconds(10)).until(() -> dropped("gave-up") == 1 && sink.pending() == 0);
        assertThat(count("bracket.webhook.retries")).isGreaterThanOrEqualTo(2);
        assertThat(count("bracket.webhook.deliveries")).isZero();
    }

    @Test
    @DisplayName("a full queue drops new transitions; closing drops and counts what is left")
    void boundedQueue() {
        sink = new WebhookSink(target(Duration.ofSeconds(1), Duration.ofSeconds(60), 2, 50, 100), registry, name -> null);
        List<AlertTransition> ts = Transitions.alternating(Transitions.key("rollout", "mts-negative"), 5);
        sink.accept(ts.get(0));
        await().atMost(Duration.ofSeconds(10)).until(() -> count("bracket.webhook.failures") >= 1);
        ts.subList(1, 5).forEach(sink::accept);
        assertThat(dropped("queue-full")).isEqualTo(2);
        assertThat(sink.pending()).isEqualTo(3);
        sink.close(Duration.ofMillis(100));
        assertThat(dropped("shutdown")).isEqualTo(3);
        sink = null;
    }

    @Test
    @DisplayName("a refusal (4xx other than 408/425/429) is not retried; later transitions still go out")
    void refusalNotRetried() throws Exception {
        receiver.start(n -> n == 1 ? 400 : 200);
        sink = new WebhookSink(target(Duration.ofSeconds(1), Duration.ofSeconds(30), 10, 50, 100), registry, name -> null);
        List<AlertTransition> ts = Transitions.alternating(Transitions.key("rollout", "mts-negative"), 2);
        ts.forEach(sink::accept);
        await().atMost(Duration.ofSeconds(10)).until(() -> receiver.requests().size() == 2);
        assertThat(receiver.uniqueDeliveries()).containsExactly(ts.get(1).transitionId());
        assertThat(dropped("refused")).isEqualTo(1);
        assertThat(count("bracket.webhook.retries")).isZero();
    }
    @Test
    @DisplayName("at start it resumes, ahead of new ones, the transitions the ledger does not cover and retry-for still allows")
    void resumesWhatIsOwed() throws Exception {
        receiver.start(n -> 200);
        AlertLedger ledger = AlertLedger.inMemory();
        WebhookTarget target = target(Duration.ofSeconds(1), Duration.ofSeconds(150), 10, 50, 100);
        List<AlertDocument> raised = Transitions.alternating(Transitions.key("rollout", "mts-negative"), 4).stream()
                .map(AlertDocument::of).toList(); // raised at T0, T0+60s, T0+120s, T0+180s
        ledger.recordDelivered(target, raised.get(0));
        sink = new WebhookSink(target, registry, name -> null, ledger);

        // At T0+220s the second (raised at T0+60s, 150 s retry-for) is out of time.
        assertThat(sink.resume(raised, Snapshots.T0.plusSeconds(220))).isEqualTo(2);
        AlertTransition fresh = Transitions.alternating(Transitions.key("rollout", "mtr-positive"), 1).get(0);
        sink.accept(fresh);
        await().atMost(Duration.ofSeconds(10)).until(() -> receiver.uniqueDeliveries().size() == 3);

        assertThat(receiver.uniqueDeliveries()).containsExactly(raised.get(2).transitionId(), raised.get(3).transitionId(),
                fresh.transitionId());
        assertThat(receiver.requests().get(0).body()).as("the stored document, unchanged").isEqualTo(raised.get(2).text());
        await().atMost(Duration.ofSeconds(5)).until(() -> ledger.delivered(target, raised.get(3))
                && ledger.delivered(target, AlertDocument.of(fresh)));
    }
}
