package dev.bracket.bench;

import java.lang.management.ManagementFactory;
import java.lang.management.ThreadInfo;
import java.lang.management.ThreadMXBean;
import java.util.Locale;
import java.util.function.Predicate;

/**
 * CPU time of this JVM and of one named thread over a measured interval, to tell whether a
 * contender was limited by its own thread's work or waited (for fetches, or for a core).
 */
final class CpuUse {

    private static final ThreadMXBean THREADS = ManagementFactory.getThreadMXBean();
    private static final com.sun.management.OperatingSystemMXBean OS =
            (com.sun.management.OperatingSystemMXBean) ManagementFactory.getOperatingSystemMXBean();

    private final long threadId;
    private final long wall0 = System.nanoTime();
    private final long thread0;
    private final long process0 = OS.getProcessCpuTime();
    private final long gc0 = gcMillis();
    private final long gcCount0 = gcCount();

    private static long gcMillis() {
        return ManagementFactory.getGarbageCollectorMXBeans().stream().mapToLong(b -> b.getCollectionTime()).sum();
    }

    private static long gcCount() {
        return ManagementFactory.getGarbageCollectorMXBeans().stream().mapToLong(b -> b.getCollectionCount()).sum();
    }

    private final java.util.Map<Long, Long> all0 = new java.util.HashMap<>();

    private CpuUse(long threadId) {
        this.threadId = threadId;
        this.thread0 = THREADS.getThreadCpuTime(threadId);
        for (long id : THREADS.getAllThreadIds()) {
            all0.put(id, THREADS.getThreadCpuTime(id));
        }
    }

    /** The busiest threads since the start (diagnostics). */
    String busiest(int n) {
        double wall = System.nanoTime() - wall0;
        java.util.List<String> out = new java.util.ArrayList<>();
        java.util.Map<String, Double> use = new java.util.HashMap<>();
        for (long id : THREADS.getAllThreadIds()) {
            ThreadInfo info = THREADS.getThreadInfo(id);
            long now = THREADS.getThreadCpuTime(id);
            if (info == null || now < 0) {
                continue;
            }
            String name = info.getThreadName().replaceAll("[0-9a-f]{8}-[0-9a-f-]{27}", "*").replaceAll("-[0-9]+$", "-N");
            use.merge(name, (now - all0.getOrDefault(id, 0L)) / wall, Double::sum);
        }
        use.entrySet().stream().sorted((a, b) -> Double.compare(b.getValue(), a.getValue())).limit(n)
                .forEach(e -> out.add(String.format(Locale.ROOT, "%s %.0f%%", e.getKey(), 100 * e.getValue())));
        return String.join(", ", out);
    }

    /** Starts measuring, following the first live thread whose name passes {@code name}. */
    static CpuUse start(Predicate<String> name) {
        for (ThreadInfo t : THREADS.dumpAllThreads(false, false)) {
            if (name.test(t.getThreadName())) {
                return new CpuUse(t.getThreadId());
            }
        }
        throw new IllegalStateException("no such thread");
    }

    /** CPU time of the followed thread since the start, in nanoseconds. */
    long threadNanos() {
        return THREADS.getThreadCpuTime(threadId) - thread0;
    }

    /** "thread T% of a core, JVM P% of N cores" since the start. */
    String since() {
        double wall = System.nanoTime() - wall0;
        double thread = THREADS.getThreadCpuTime(threadId) - thread0;
        double process = OS.getProcessCpuTime() - process0;
        int cores = Runtime.getRuntime().availableProcessors();
        return String.format(Locale.ROOT, "thread %.0f%% of a core, JVM %.0f%% of %d cores, %d collections taking %d ms",
                100 * thread / wall, 100 * process / wall / cores, cores, gcCount() - gcCount0, gcMillis() - gc0);
    }
}
