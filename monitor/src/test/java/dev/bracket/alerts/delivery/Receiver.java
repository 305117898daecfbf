package dev.bracket.alerts.delivery;

import com.sun.net.httpserver.HttpServer;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.net.InetSocketAddress;
import java.net.ServerSocket;
import java.nio.charset.StandardCharsets;
import java.util.List;
import java.util.concurrent.CopyOnWriteArrayList;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.atomic.AtomicInteger;
import java.util.function.IntUnaryOperator;

/**
 * A real HTTP receiver on the loopback interface for webhook tests. It answers request number n
 * (from 1) with the status {@code behaviour} gives for n, optionally after a delay, and records
 * every request as it arrived.
 */
public final class Receiver implements AutoCloseable {

    public record Request(long arrivedNanos, String idempotencyKey, String authorization, String body, int status) {
    }

    private final int port;
    private final List<Request> requests = new CopyOnWriteArrayList<>();
    private final AtomicInteger count = new AtomicInteger();
    private HttpServer server;
    private ExecutorService executor;

    /** Reserves a free port without listening on it yet: the receiver is "down" until {@link #start}. */
    public Receiver() {
        try (ServerSocket s = new ServerSocket(0, 1, java.net.InetAddress.getLoopbackAddress())) {
            port = s.getLocalPort();
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    public String url() {
        return "http://127.0.0.1:" + port + "/hook";
    }

    /**
     * @param behaviour status for request number n
     * @param delayMillis delay before answering request number n
     */
    void start(IntUnaryOperator behaviour, IntUnaryOperator delayMillis) throws IOException {
        server = HttpServer.create(new InetSocketAddress("127.0.0.1", port), 16);
        executor = Executors.newCachedThreadPool();
        server.setExecutor(executor);
        server.createContext("/hook", exchange -> {
            long arrived = System.nanoTime();
            int n = count.incrementAndGet();
            String body = new String(exchange.getRequestBody().readAllBytes(), StandardCharsets.UTF_8);
            try {
                Thread.sleep(delayMillis.applyAsInt(n));
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
            }
            int status = behaviour.applyAsInt(n);
            requests.add(new Request(arrived, exchange.getRequestHeaders().getFirst("Idempotency-Key"),
                    exchange.getRequestHeaders().getFirst("Authorization"), body, status));
            exchange.sendResponseHeaders(status, -1);
            exchange.close();
        });
        server.start();
    }

    public void start(IntUnaryOperator behaviour) throws IOException {
        start(behaviour, n -> 0);
    }

    public List<Request> requests() {
        return List.copyOf(requests);
    }

    /** The idempotency keys of successful requests, each once, in the order first acknowledged. */
    public List<String> uniqueDeliveries() {
        return requests.stream().filter(r -> r.status() / 100 == 2).map(Request::idempotencyKey).distinct().toList();
    }

    @Override
    public void close() {
        if (server != null) {
            server.stop(0);
            executor.shutdownNow();
        }
    }
}
