package dev.bracket.alerts.delivery;

import dev.bracket.alerts.AlertRule;
import dev.bracket.alerts.AlertTransition;
import dev.bracket.alerts.TransitionKind;
import io.micrometer.core.instrument.Counter;
import io.micrometer.core.instrument.MeterRegistry;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

import java.util.ArrayList;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;

/**
 * Hands each transition to every sink that wants it: the common sinks (topic, log, recent list)
 * get all, a study's webhooks get that study's. A failing sink is logged and counted and does
 * not keep the others from their transitions. Counts {@code bracket.alerts.fired} and
 * {@code bracket.alerts.resolved} per rule.
 */
public final class AlertDispatcher implements AutoCloseable {

    private static final Logger LOG = LoggerFactory.getLogger(AlertDispatcher.class);

    private final List<AlertSink> common;
    private final Map<String, List<AlertSink>> byStudy;
    private final MeterRegistry registry;

    /**
     * @param common  sinks for every transition
     * @param byStudy further sinks per study id (a sink may serve several studies)
     */
    public AlertDispatcher(List<AlertSink> common, Map<String, List<AlertSink>> byStudy, MeterRegistry registry) {
        this.common = List.copyOf(common);
        this.byStudy = Map.copyOf(byStudy);
        this.registry = registry;
        // Registered at zero so dashboards show every rule before its first alert.
        for (AlertRule rule : AlertRule.values()) {
            counter(TransitionKind.FIRING, rule);
            counter(TransitionKind.RESOLVED, rule);
        }
    }

    private Counter counter(TransitionKind kind, AlertRule rule) {
        return Counter.builder(kind == TransitionKind.FIRING ? "bracket.alerts.fired" : "bracket.alerts.resolved")
                .description("alert transitions by rule").tag("rule", rule.id()).register(registry);
    }

    public synchronized void publish(List<AlertTransition> transitions) {
        for (AlertTransition t : transitions) {
            counter(t.kind(), t.key().rule()).increment();
            for (AlertSink sink : sinksFor(t.key().study())) {
                try {
                    sink.accept(t);
                } catch (RuntimeException e) {
                    Counter.builder("bracket.alerts.sink.failures").tag("sink", sink.name()).register(registry).increment();
                    LOG.error("alert sink {} failed on transition {} of {}: {}", sink.name(), t.transitionId(), t.key(), e.toString());
                }
            }
        }
    }

    private List<AlertSink> sinksFor(String study) {
        List<AlertSink> out = new ArrayList<>(common);
        out.addAll(byStudy.getOrDefault(study, List.of()));
        return out;
    }

    /** Closes every sink once (a webhook shared by studies is closed once). */
    @Override
    public void close() {
        Set<AlertSink> all = new LinkedHashSet<>(common);
        byStudy.values().forEach(all::addAll);
        for (AlertSink sink : all) {
            try {
                sink.close();
            } catch (RuntimeException e) {
                LOG.error("closing alert sink {} failed: {}", sink.name(), e.toString());
            }
        }
    }
}
