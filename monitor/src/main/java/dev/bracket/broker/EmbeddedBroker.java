package dev.bracket.broker;

import kafka.server.KafkaConfig;
import kafka.server.KafkaRaftServer;
import org.apache.kafka.common.Uuid;
import org.apache.kafka.common.utils.Time;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.OutputStream;
import java.io.PrintStream;
import java.net.InetAddress;
import java.net.ServerSocket;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Properties;
import java.util.concurrent.CountDownLatch;

/**
 * A real single-node Kafka (KRaft: broker and controller in one) inside this JVM, for running
 * the monitor without a cluster and for tests. The data directory is formatted once (only when
 * it has no {@code meta.properties}, since formatting again with a new cluster id would break a
 * restart) and reused, so topics, partials and offsets survive restarts; ports may change.
 *
 * <p>{@link #main} runs it as a process of its own: {@code java -cp bracket.jar
 * dev.bracket.broker.EmbeddedBroker DATA_DIR [PORT]} prints {@code bootstrap.servers=HOST:PORT}
 * and stops cleanly on SIGTERM.
 */
public final class EmbeddedBroker implements AutoCloseable {

    private final KafkaRaftServer server;
    private final String bootstrapServers;
    private final Path dataDir;

    private EmbeddedBroker(KafkaRaftServer server, String bootstrapServers, Path dataDir) {
        this.server = server;
        this.bootstrapServers = bootstrapServers;
        this.dataDir = dataDir;
    }

    /**
     * Starts a broker on {@code port} (0: any free port) storing its logs under {@code dataDir}.
     * Whatever goes wrong (a busy port, a directory that cannot be written, a class missing from
     * the jar) stops what had started and ends in one {@link BrokerStartException}, so the caller
     * can exit at once instead of living on beside a half-started broker.
     *
     * @throws BrokerStartException when the broker cannot start, with the reason and what to change
     */
    public static EmbeddedBroker start(Path dataDir, int port) {
        prepareDirectory(dataDir);
        int brokerPort = port == 0 ? freePort() : requireFree(port);
        Properties props = properties(dataDir, brokerPort, freePort());
        KafkaRaftServer server = null;
        try {
            if (!Files.exists(dataDir.resolve("meta.properties"))) {
                format(dataDir, props);
            }
            server = new KafkaRaftServer(KafkaConfig.fromProps(props, false), Time.SYSTEM);
            server.startup();
            return new EmbeddedBroker(server, "localhost:" + brokerPort, dataDir);
        } catch (Exception | LinkageError e) {
            // LinkageError too: a class missing from the jar must end the start, not the calling thread.
            if (server != null) {
                try {
                    server.shutdown();
                } catch (Exception | LinkageError alsoFailed) {
                    e.addSuppressed(alsoFailed);
                }
            }
            throw new BrokerStartException(" in " + dataDir + ": " + rootCause(e), e);
        }
    }

    private static void prepareDirectory(Path dataDir) {
        try {
            Files.createDirectories(dataDir);
            Files.deleteIfExists(Files.createTempFile(dataDir, ".bracket-write-check", ""));
        } catch (IOException | SecurityException e) {
            throw new BrokerStartException(": its data directory " + dataDir + " cannot be created or written (" + rootCause(e)
                    + "); set broker.data-dir to a writable directory", e);
        }
    }

    private static int requireFree(int port) {
        try (ServerSocket s = new ServerSocket(port, 1, InetAddress.getLoopbackAddress())) {
            s.setReuseAddress(true);
            return port;
        } catch (IOException e) {
            throw new BrokerStartException(": port " + port + " on localhost is in use (" + rootCause(e)
                    + "); set broker.port to a free port, or kafka.bootstrap.servers to use a running Kafka", e);
        }
    }

    private static String rootCause(Throwable e) {
        Throwable root = e;
        while (root.getCause() != null && root.getCause() != root) {
            root = root.getCause();
        }
        String message = root.getMessage();
        return root.getClass().getSimpleName() + (message == null ? "" : ": " + message);
    }

    static Properties properties(Path dataDir, int brokerPort, int controllerPort) {
        Properties p = new Properties();
        p.put("process.roles", "broker,controller");
        p.put("node.id", "1");
        p.put("controller.quorum.voters", "1@localhost:" + controllerPort);
        p.put("listeners", "PLAINTEXT://localhost:" + brokerPort + ",CONTROLLER://localhost:" + controllerPort);
        p.put("advertised.listeners", "PLAINTEXT://localhost:" + brokerPort);
        p.put("controller.listener.names", "CONTROLLER");
        p.put("inter.broker.listener.name", "PLAINTEXT");
        p.put("listener.security.protocol.map", "PLAINTEXT:PLAINTEXT,CONTROLLER:PLAINTEXT");
        p.put("log.dirs", dataDir.toAbsolutePath().toString());
        // One node: every internal topic with one replica, or groups and transactions never work.
        p.put("offsets.topic.replication.factor", "1");
        p.put("offsets.topic.num.partitions", "5");
        p.put("transaction.state.log.replication.factor", "1");
        p.put("transaction.state.log.min.isr", "1");
        p.put("transaction.state.log.num.partitions", "5");
        p.put("share.coordinator.state.topic.replication.factor", "1");
        p.put("share.coordinator.state.topic.min.isr", "1");
        p.put("group.initial.rebalance.delay.ms", "0");
        p.put("num.partitions", "3");
        // The default dedupe buffer costs 128 MB of heap; compaction of small keys needs little.
        p.put("log.cleaner.dedupe.buffer.size", "2097152");
        return p;
    }

    private static void format(Path dataDir, Properties props) throws IOException {
        Path file = Files.createTempFile("bracket-broker", ".properties");
        try {
            try (OutputStream out = Files.newOutputStream(file)) {
                props.store(out, "bracket embedded broker");
            }
            ByteArrayOutputStream log = new ByteArrayOutputStream();
            int code;
            try (PrintStream ps = new PrintStream(log, true, StandardCharsets.UTF_8)) {
                code = kafka.tools.StorageTool.execute(new String[] {
                        "format", "-t", Uuid.randomUuid().toString(), "-c", file.toString(), "--ignore-formatted"}, ps);
            }
            if (code != 0) {
                throw new IllegalStateException("formatting " + dataDir + " failed: " + log.toString(StandardCharsets.UTF_8).trim());
            }
        } finally {
            Files.deleteIfExists(file);
        }
    }

    private static int freePort() {
        try (ServerSocket s = new ServerSocket(0, 1, InetAddress.getLoopbackAddress())) {
            s.setReuseAddress(true);
            return s.getLocalPort();
        } catch (IOException e) {
            throw new BrokerStartException(": no free port on localhost (" + rootCause(e) + ")", e);
        }
    }

    /** {@code localhost:PORT}, for {@code bootstrap.servers}. */
    public String bootstrapServers() {
        return bootstrapServers;
    }

    public Path dataDir() {
        return dataDir;
    }

    @Override
    public void close() {
        server.shutdown();
        server.awaitShutdown();
    }

    /** Runs a broker until the process is told to stop. Arguments: DATA_DIR [PORT]. */
    public static void main(String[] args) throws InterruptedException {
        if (args.length < 1 || args.length > 2) {
            System.err.println("usage: EmbeddedBroker DATA_DIR [PORT]");
            System.exit(2);
        }
        EmbeddedBroker broker = start(Path.of(args[0]), args.length > 1 ? Integer.parseInt(args[1]) : 0);
        CountDownLatch done = new CountDownLatch(1);
        Runtime.getRuntime().addShutdownHook(new Thread(() -> {
            broker.close();
            done.countDown();
        }, "bracket-broker-shutdown"));
        System.out.println("bootstrap.servers=" + broker.bootstrapServers());
        System.out.flush();
        done.await();
    }
}
