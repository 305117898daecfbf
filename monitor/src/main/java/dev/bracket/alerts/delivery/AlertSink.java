package dev.bracket.alerts.delivery;

import dev.bracket.alerts.AlertTransition;

/**
 * Somewhere alert transitions go. {@link #accept} is called in transition order from one thread
 * and must return quickly: a sink that talks to a slow receiver queues internally.
 */
public interface AlertSink extends AutoCloseable {

    /** A short name for logs and metric tags, e.g. {@code kafka} or {@code webhook}. */
    String name();

    void accept(AlertTransition transition);

    /** Delivers or accounts for whatever is still pending; the default has nothing pending. */
    @Override
    default void close() {
    }
}
