package dev.bracket.broker;

import org.junit.jupiter.api.extension.AfterAllCallback;
import org.junit.jupiter.api.extension.BeforeAllCallback;
import org.junit.jupiter.api.extension.ExtensionContext;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Comparator;
import java.util.stream.Stream;

/**
 * One real single-node broker for a whole test class, in a fresh data directory that is removed
 * afterwards. Register as {@code @RegisterExtension static final BrokerPerClass KAFKA = new BrokerPerClass();}.
 */
public final class BrokerPerClass implements BeforeAllCallback, AfterAllCallback {

    private Path dataDir;
    private EmbeddedBroker broker;

    @Override
    public void beforeAll(ExtensionContext context) throws IOException {
        dataDir = Files.createTempDirectory("bracket-test-kafka");
        broker = EmbeddedBroker.start(dataDir.resolve("kafka"), 0);
    }

    @Override
    public void afterAll(ExtensionContext context) {
        broker.close();
        try (Stream<Path> files = Files.walk(dataDir)) {
            files.sorted(Comparator.reverseOrder()).forEach(p -> p.toFile().delete());
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    /** The running broker. */
    public EmbeddedBroker broker() {
        return broker;
    }

    public String bootstrapServers() {
        return broker.bootstrapServers();
    }
}
