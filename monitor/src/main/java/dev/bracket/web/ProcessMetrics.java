package dev.bracket.web;

import io.micrometer.core.instrument.MeterRegistry;
import io.micrometer.core.instrument.binder.jvm.ClassLoaderMetrics;
import io.micrometer.core.instrument.binder.jvm.JvmGcMetrics;
import io.micrometer.core.instrument.binder.jvm.JvmMemoryMetrics;
import io.micrometer.core.instrument.binder.jvm.JvmThreadMetrics;
import io.micrometer.core.instrument.binder.system.ProcessorMetrics;
import io.micrometer.core.instrument.binder.system.UptimeMetrics;

/**
 * The JVM's and the process's own metrics (heap and non-heap memory, garbage collection,
 * threads, loaded classes, CPU use, uptime) from Micrometer's standard binders, so a dashboard
 * can tell a monitor that trails its input because it is starved from one that waits for data.
 */
final class ProcessMetrics {

    private ProcessMetrics() {
    }

    /** @return the GC binder, whose notification listener is removed by closing it */
    static JvmGcMetrics bindTo(MeterRegistry registry) {
        new JvmMemoryMetrics().bindTo(registry);
        JvmGcMetrics gc = new JvmGcMetrics();
        gc.bindTo(registry);
        new JvmThreadMetrics().bindTo(registry);
        new ClassLoaderMetrics().bindTo(registry);
        new ProcessorMetrics().bindTo(registry);
        new UptimeMetrics().bindTo(registry);
        return gc;
    }
}
