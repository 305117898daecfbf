package dev.bracket.bench;

import java.lang.management.ManagementFactory;

/** The heap in use after full collections: what the heap harnesses subtract to measure bytes held. */
public final class HeapInUse {

    private HeapInUse() {
    }

    /** Bytes of heap in use after four requested collections, 100 ms apart (for a stop-the-world collector to settle). */
    public static long afterGc() {
        for (int i = 0; i < 4; i++) {
            System.gc();
            try {
                Thread.sleep(100);
            } catch (InterruptedException ex) {
                Thread.currentThread().interrupt();
            }
        }
        return ManagementFactory.getMemoryMXBean().getHeapMemoryUsage().getUsed();
    }
}
