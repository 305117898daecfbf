package dev.bracket.app;

import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.admin.DescribeClusterOptions;

import java.util.concurrent.ExecutionException;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.TimeoutException;

/**
 * Asks the cluster for its brokers to tell whether Kafka is reachable. The answer is kept for a
 * few seconds so that frequent health checks do not become load on the cluster.
 */
final class BrokerProbe implements AutoCloseable {

    private static final long TIMEOUT_MILLIS = 2_000;
    private static final long KEEP_NANOS = TimeUnit.SECONDS.toNanos(5);

    private final Admin admin;
    private long askedNanos;
    private boolean reachable;
    private boolean asked;

    BrokerProbe(Admin admin) {
        this.admin = admin;
    }

    /** Whether the cluster answered within two seconds, asked at most every five seconds. */
    synchronized boolean reachable() {
        long now = System.nanoTime();
        if (!asked || now - askedNanos >= KEEP_NANOS) {
            reachable = ask();
            askedNanos = System.nanoTime();
            asked = true;
        }
        return reachable;
    }

    private boolean ask() {
        try {
            return !admin.describeCluster(new DescribeClusterOptions().timeoutMs((int) TIMEOUT_MILLIS)).nodes()
                    .get(TIMEOUT_MILLIS + 500, TimeUnit.MILLISECONDS).isEmpty();
        } catch (ExecutionException | TimeoutException | RuntimeException e) {
            return false;
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            return false;
        }
    }

    @Override
    public void close() {
        admin.close(java.time.Duration.ofSeconds(5));
    }
}
