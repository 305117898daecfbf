package dev.bracket.demo;

import java.io.IOException;
import java.net.InetSocketAddress;
import java.net.Socket;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.Optional;

/**
 * Whether any bootstrap server accepts a connection at all, asked before a producer starts: the
 * Kafka producer itself would retry an address where nothing listens for a minute per record,
 * logging a warning for every attempt.
 */
final class BootstrapCheck {

    private BootstrapCheck() {
    }

    /**
     * Tries a TCP connection to each {@code host:port} of the list in turn.
     *
     * @return empty when one accepts (or an entry is not {@code host:port}, which the producer's own
     *         configuration check reports); otherwise why each failed
     */
    static Optional<String> unreachable(String bootstrapServers, Duration timeout) {
        List<String> failures = new ArrayList<>();
        for (String entry : bootstrapServers.split(",")) {
            String address = entry.trim();
            int colon = address.lastIndexOf(':');
            int port;
            try {
                port = Integer.parseInt(address.substring(colon + 1));
            } catch (NumberFormatException | IndexOutOfBoundsException notHostPort) {
                return Optional.empty();
            }
            String host = address.substring(0, Math.max(colon, 0)).replace("[", "").replace("]", "");
            try (Socket socket = new Socket()) {
                socket.connect(new InetSocketAddress(host, port), (int) timeout.toMillis());
                return Optional.empty();
            } catch (IOException | IllegalArgumentException e) {
                failures.add(address + " (" + e.getClass().getSimpleName() + (e.getMessage() == null ? "" : ": " + e.getMessage()) + ")");
            }
        }
        return Optional.of("nothing accepts a connection at " + String.join(", ", failures));
    }
}
