package dev.bracket.alerts.delivery;

import dev.bracket.alerts.WebhookTarget;
import dev.bracket.alerts.AlertText;
import dev.bracket.alerts.AlertTransition;
import dev.bracket.retry.Backoff;
import io.micrometer.core.instrument.Counter;
import io.micrometer.core.instrument.Gauge;
import io.micrometer.core.instrument.MeterRegistry;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

import java.io.IOException;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import java.util.Optional;
import java.util.Random;
import java.util.concurrent.LinkedBlockingQueue;
import java.util.concurrent.TimeUnit;
import java.util.function.UnaryOperator;

/**
 * POSTs each transition's JSON document to one receiver, in order, with retries.
 *
 * <ul>
 *   <li>Order: one delivery thread takes transitions from a FIFO queue, so every key's
 *       transitions arrive in the order they happened (a firing before its resolution).</li>
 *   <li>Retries: connection errors, timeouts, 408, 425, 429 and 5xx are retried with
 *       {@link Backoff exponential backoff} (a {@code Retry-After} in seconds lengthens the wait,
 *       up to the maximum backoff). Other statuses are the receiver's refusal: the transition is
 *       dropped, logged and counted, and delivery moves on.</li>
 *   <li>Nothing is lost while the receiver is down and back within {@code retry-for} of a
 *       transition: it waits in the queue. A transition still undelivered {@code retry-for} after
 *       it was raised is dropped after at least one attempt; a transition arriving while the
 *       queue is full is dropped at once. Both are logged with the transition id and counted in
 *       {@code bracket.webhook.dropped}.</li>
 *   <li>Restarts: once the receiver has answered for a transition (2xx, refusal, or given up),
 *       the sink records it in the {@link AlertLedger}. At start, {@link #resume} queues, ahead
 *       of anything new, every transition of the alerts topic this endpoint serves that the
 *       ledger does not cover and that is still within {@code retry-for} of being raised. So a
 *       stop or a crash (SIGKILL included) while the receiver is down loses nothing: the queue in
 *       memory is only a cache of what the topic and the ledger say is owed. With an in-memory
 *       ledger (no Kafka cluster) what is queued at stop is dropped, counted and logged.</li>
 *   <li>Each request carries {@code Idempotency-Key: <transition id>}: a receiver that saw a
 *       request time out on our side but arrive on its side recognises the retry.</li>
 *   <li>{@code Authorization: Bearer <token>} when the target names an environment variable that
 *       holds a token; the variable is read at each request, so a rotated token takes effect.</li>
 * </ul>
 *
 * Metrics, tagged with the endpoint (URL without query): {@code bracket.webhook.deliveries},
 * {@code bracket.webhook.failures} (failed attempts), {@code bracket.webhook.retries},
 * {@code bracket.webhook.dropped} (tag {@code reason}: queue-full, gave-up, refused, shutdown) and
 * the gauge {@code bracket.webhook.queued}.
 */
public final class WebhookSink implements AlertSink {

    private static final Logger LOG = LoggerFactory.getLogger(WebhookSink.class);
    private static final Duration DEFAULT_GRACE = Duration.ofSeconds(5);

    /** A transition to deliver, and the {@link System#nanoTime} after which it is given up. */
    private record Pending(AlertDocument transition, long deadlineNanos) {
    }

    private final WebhookTarget target;
    private final AlertLedger ledger;
    private final UnaryOperator<String> environment;
    private final HttpClient client;
    private final Backoff backoff;
    private final Random jitter = new Random();
    private final LinkedBlockingQueue<Pending> queue;
    private final Thread worker;
    private final MeterRegistry registry;
    private final Counter deliveries;
    private final Counter failures;
    private final Counter retries;
    private volatile boolean closing;
    private volatile Pending inFlight;

    /** A sink reading the token from the process environment, recording deliveries in {@code ledger}. */
    public WebhookSink(WebhookTarget target, MeterRegistry registry, AlertLedger ledger) {
        this(target, registry, System::getenv, ledger);
    }

    /** A sink whose deliveries are remembered in memory only. */
    public WebhookSink(WebhookTarget target, MeterRegistry registry, UnaryOperator<String> environment) {
        this(target, registry, environment, AlertLedger.inMemory());
    }

    /**
     * @param environment looks environment variables up by name (tests pass their own)
     * @param ledger      where finished deliveries are recorded, and read at {@link #resume}
     */
    public WebhookSink(WebhookTarget target, MeterRegistry registry, UnaryOperator<String> environment, AlertLedger ledger) {
        this.target = target;
        this.ledger = ledger;
        this.environment = environment;
        this.registry = registry;
        this.client = HttpClient.newBuilder().version(HttpClient.Version.HTTP_1_1).connectTimeout(target.timeout()).build();
        this.backoff = new Backoff(target.initialBackoff(), target.maxBackoff());
        this.queue = new LinkedBlockingQueue<>(target.queueCapacity());
        this.deliveries = counter("bracket.webhook.deliveries", "transitions delivered");
        this.failures = counter("bracket.webhook.failures", "failed delivery attempts");
        this.retries = counter("bracket.webhook.retries", "delivery attempts after the first");
        Gauge.builder("bracket.webhook.queued", queue, LinkedBlockingQueue::size).tag("endpoint", target.endpoint())
                .description("transitions waiting for delivery").register(registry);
        this.worker = new Thread(this::deliverLoop, "bracket-webhook " + target.endpoint());
        this.worker.setDaemon(true);
        this.worker.start();
    }

    @Override
    public String name() {
        return "webhook";
    }

    @Override
    public void accept(AlertTransition t) {
        enqueue(AlertDocument.of(t), System.nanoTime() + target.retryFor().toNanos());
    }

    /**
     * Queues the transitions this endpoint still owes from before the start: those not covered by
     * the ledger and raised no longer than {@code retry-for} before {@code now}. Call before the
     * first {@link #accept}.
     *
     * @param raised this endpoint's transitions from the alerts topic, oldest first
     * @param now    the wall-clock time the raising times are measured against
     * @return how many were queued
     */
    public int resume(List<AlertDocument> raised, Instant now) {
        int queued = 0;
        for (AlertDocument d : raised) {
            Duration left = Duration.between(now, d.at().plus(target.retryFor()));
            if (ledger.delivered(target, d) || left.isNegative()) {
                continue;
            }
            if (enqueue(d, System.nanoTime() + left.toNanos())) {
                queued++;
            }
        }
        if (queued > 0) {
            LOG.info("webhook {}: resuming {} transition(s) not delivered before the restart", target.endpoint(), queued);
        }
        return queued;
    }

    private boolean enqueue(AlertDocument d, long deadlineNanos) {
        if (closing || !queue.offer(new Pending(d, deadlineNanos))) {
            drop(d, closing ? "shutdown" : "queue-full",
                    closing ? "the sink is closing" : "the queue holds " + target.queueCapacity() + " transitions already");
            return false;
        }
        return true;
    }

    /** Transitions waiting or in flight. */
    public int pending() {
        return queue.size() + (inFlight == null ? 0 : 1);
    }

    private void deliverLoop() {
        try {
            while (!closing || !queue.isEmpty()) {
                Pending p = queue.poll(200, TimeUnit.MILLISECONDS);
                if (p != null) {
                    inFlight = p;
                    deliver(p);
                    ledger.recordDelivered(target, p.transition());
                    inFlight = null;
                }
            }
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
    }

    /** Attempts until delivered, refused or out of time; interrupted only by {@link #close}. */
    private void deliver(Pending p) throws InterruptedException {
        AlertDocument t = p.transition();
        byte[] body = t.text().getBytes(StandardCharsets.UTF_8);
        long deadline = p.deadlineNanos();
        for (int attempt = 1; ; attempt++) {
            if (attempt > 1) {
                retries.increment();
            }
            Optional<Duration> retryAfter;
            String problem;
            try {
                HttpResponse<String> response = client.send(request(t, body), HttpResponse.BodyHandlers.ofString());
                int status = response.statusCode();
                if (status / 100 == 2) {
                    deliveries.increment();
                    if (attempt > 1) {
                        LOG.info("webhook {} took transition {} at attempt {}", target.endpoint(), t.transitionId(), attempt);
                    }
                    return;
                }
                failures.increment();
                problem = "HTTP " + status;
                if (!retryable(status)) {
                    drop(t, "refused", problem + " " + abbreviate(response.body()));
                    return;
                }
                retryAfter = response.headers().firstValue("Retry-After").flatMap(WebhookSink::seconds);
            } catch (IOException e) {
                failures.increment();
                problem = e.getClass().getSimpleName() + (e.getMessage() == null ? "" : ": " + e.getMessage());
                retryAfter = Optional.empty();
            }
            long now = System.nanoTime();
            if (now - deadline >= 0) {
                drop(t, "gave-up", "still failing (" + problem + ") " + AlertText.duration(target.retryFor())
                        + " after the transition was raised, " + attempt + " attempts");
                return;
            }
            Duration wait = backoff.delay(attempt, jitter);
            if (retryAfter.isPresent() && retryAfter.get().compareTo(wait) > 0) {
                wait = retryAfter.get().compareTo(target.maxBackoff()) < 0 ? retryAfter.get() : target.maxBackoff();
            }
            long sleepNanos = Math.min(wait.toNanos(), deadline - now);
            if (attempt == 1) {
                LOG.warn("webhook {} failed for transition {} ({}); retrying with backoff", target.endpoint(),
                        t.transitionId(), problem);
            }
            TimeUnit.NANOSECONDS.sleep(Math.max(0, sleepNanos));
        }
    }

    private HttpRequest request(AlertDocument t, byte[] body) {
        HttpRequest.Builder b = HttpRequest.newBuilder(target.url())
                .timeout(target.timeout())
                .header("Content-Type", "application/json")
                .header("Idempotency-Key", t.transitionId())
                .POST(HttpRequest.BodyPublishers.ofByteArray(body));
        Optional.ofNullable(target.tokenEnv()).map(environment).filter(v -> !v.isBlank())
                .ifPresent(token -> b.header("Authorization", "Bearer " + token.trim()));
        return b.build();
    }

    static boolean retryable(int status) {
        return status == 408 || status == 425 || status == 429 || status >= 500;
    }

    private static Optional<Duration> seconds(String header) {
        try {
            long s = Long.parseLong(header.trim());
            return s >= 0 ? Optional.of(Duration.ofSeconds(s)) : Optional.empty();
        } catch (NumberFormatException e) {
            return Optional.empty(); // an HTTP date: the backoff alone decides
        }
    }

    private static String abbreviate(String text) {
        String oneLine = text == null ? "" : text.replaceAll("\\s+", " ").trim();
        return oneLine.length() <= 200 ? oneLine : oneLine.substring(0, 200) + "…";
    }

    private void drop(AlertDocument t, String reason, String why) {
        Counter.builder("bracket.webhook.dropped").description("transitions given up on").tag("endpoint", target.endpoint())
                .tag("reason", reason).register(registry).increment();
        LOG.error("webhook {} dropped transition {} ({} {} of {}): {}", target.endpoint(), t.transitionId(),
                t.kind().id(), t.sequence(), t.key(), why);
    }

    private Counter counter(String name, String description) {
        return Counter.builder(name).description(description).tag("endpoint", target.endpoint()).register(registry);
    }

    /**
     * Stops taking transitions and lets delivery drain for up to 5 seconds. What is left stays
     * owed in a durable ledger (the next start resumes it); with an in-memory ledger it is
     * dropped (counted, logged).
     */
    @Override
    public void close() {
        close(DEFAULT_GRACE);
    }

    public void close(Duration grace) {
        closing = true;
        try {
            worker.join(grace.toMillis());
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
        if (worker.isAlive()) {
            worker.interrupt();
            try {
                worker.join(1000);
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
            }
        }
        List<Pending> left = new ArrayList<>();
        Pending current = inFlight;
        if (current != null && worker.getState() == Thread.State.TERMINATED) {
            left.add(current);
        }
        queue.drainTo(left);
        if (ledger.durable()) {
            if (!left.isEmpty()) {
                LOG.warn("webhook {}: {} transition(s) not yet delivered at stop (first {}); the next start resumes them"
                        + " within retry-for", target.endpoint(), left.size(), left.get(0).transition().transitionId());
            }
        } else {
            left.forEach(p -> drop(p.transition(), "shutdown", "the monitor stopped before the receiver took it"));
        }
    }
}
