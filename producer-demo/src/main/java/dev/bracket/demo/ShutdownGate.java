package dev.bracket.demo;

import java.time.Duration;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;

/**
 * Lets a command finish its work on Ctrl-C or SIGTERM. The JVM halts as soon as its shutdown
 * hooks return, so the hook registered here only asks the command to stop and then waits, at
 * most {@code maxWait}, until the command has wound down and calls {@link #close}.
 */
public final class ShutdownGate implements AutoCloseable {

    private final CountDownLatch stop = new CountDownLatch(1);
    private final CountDownLatch finished = new CountDownLatch(1);
    private final Thread hook;

    public ShutdownGate(String name, Duration maxWait) {
        hook = new Thread(() -> {
            stop.countDown();
            try {
                finished.await(maxWait.toMillis(), TimeUnit.MILLISECONDS);
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
            }
        }, name);
        Runtime.getRuntime().addShutdownHook(hook);
    }

    public boolean stopRequested() {
        return stop.getCount() == 0;
    }

    /** Waits up to {@code timeout} for a stop request; true when one came. */
    public boolean awaitStop(Duration timeout) throws InterruptedException {
        return stop.await(timeout.toMillis(), TimeUnit.MILLISECONDS);
    }

    /** The command is done: a waiting hook returns, and without a stop request the hook is removed. */
    @Override
    public void close() {
        finished.countDown();
        try {
            Runtime.getRuntime().removeShutdownHook(hook);
        } catch (IllegalStateException shuttingDown) {
            // the hook is running and returns now
        }
    }
}
