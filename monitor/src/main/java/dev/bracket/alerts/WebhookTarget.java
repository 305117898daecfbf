package dev.bracket.alerts;

import java.net.URI;
import java.time.Duration;
import java.util.Locale;
import java.util.Optional;

/**
 * Where and how to POST alert documents.
 *
 * @param url            http or https URL
 * @param tokenEnv       name of an environment variable holding a bearer token, or null for none;
 *                       the token itself never appears in configuration or logs
 * @param timeout        per-request timeout (connect and response)
 * @param retryFor       how long a transition is retried before it is dropped (counted and logged)
 * @param queueCapacity  transitions waiting for this receiver at most; beyond it new ones are dropped
 * @param initialBackoff wait before the first retry; doubled after each failure
 * @param maxBackoff     the longest wait between two attempts
 */
public record WebhookTarget(URI url, String tokenEnv, Duration timeout, Duration retryFor, int queueCapacity,
                            Duration initialBackoff, Duration maxBackoff) {

    public static final Duration DEFAULT_TIMEOUT = Duration.ofSeconds(5);
    public static final Duration DEFAULT_RETRY_FOR = Duration.ofMinutes(15);
    public static final int DEFAULT_QUEUE = 1000;
    public static final Duration DEFAULT_INITIAL_BACKOFF = Duration.ofMillis(500);
    public static final Duration DEFAULT_MAX_BACKOFF = Duration.ofSeconds(60);

    public WebhookTarget {
        String scheme = url == null || url.getScheme() == null ? "" : url.getScheme().toLowerCase(Locale.ROOT);
        if (!scheme.equals("http") && !scheme.equals("https") || url.getHost() == null) {
            throw new IllegalArgumentException("webhook url must be an http or https URL with a host, was '" + url + "'");
        }
        if (tokenEnv != null && !tokenEnv.matches("[A-Za-z_][A-Za-z0-9_]*")) {
            throw new IllegalArgumentException("webhook token-env must be an environment variable name, was '" + tokenEnv + "'");
        }
        requirePositive(timeout, "timeout");
        requirePositive(retryFor, "retry-for");
        requirePositive(initialBackoff, "backoff-initial");
        requirePositive(maxBackoff, "backoff-max");
        if (maxBackoff.compareTo(initialBackoff) < 0) {
            throw new IllegalArgumentException("webhook backoff-max must be at least backoff-initial");
        }
        if (queueCapacity < 1) {
            throw new IllegalArgumentException("webhook queue must be at least 1, was " + queueCapacity);
        }
    }

    /** A target with every setting at its default. */
    public static WebhookTarget of(URI url) {
        return new WebhookTarget(url, null, DEFAULT_TIMEOUT, DEFAULT_RETRY_FOR, DEFAULT_QUEUE,
                DEFAULT_INITIAL_BACKOFF, DEFAULT_MAX_BACKOFF);
    }

    public Optional<String> token() {
        return Optional.ofNullable(tokenEnv).map(System::getenv).filter(t -> !t.isBlank());
    }

    /** The URL without query or user info, safe for logs and metric tags. */
    public String endpoint() {
        return url.getScheme() + "://" + url.getHost() + (url.getPort() < 0 ? "" : ":" + url.getPort())
                + (url.getPath() == null ? "" : url.getPath());
    }

    private static void requirePositive(Duration d, String name) {
        if (d == null || d.isNegative() || d.isZero()) {
            throw new IllegalArgumentException("webhook " + name + " must be a positive duration, was " + d);
        }
    }
}
