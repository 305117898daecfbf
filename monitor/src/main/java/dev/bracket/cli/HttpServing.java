package dev.bracket.cli;

import dev.bracket.report.store.LatestReports;
import dev.bracket.web.WebServer;
import io.micrometer.prometheusmetrics.PrometheusMeterRegistry;

/** Starts the HTTP server for a command, turning a port that cannot be bound into a one-line input error. */
final class HttpServing {

    private HttpServing() {
    }

    /** Serves on {@code bind:port}; {@code --http-port}, which chose the port, is named in the error message. */
    static WebServer start(LatestReports latest, PrometheusMeterRegistry registry, String bind, int port) {
        if (port < 0 || port > 65_535) {
            throw new InputError("--http-port must be a TCP port (0-65535; 0 picks a free one), was " + port);
        }
        WebServer web = new WebServer(latest, registry, WebServer.DEFAULT_HISTORY);
        try {
            return web.start(bind, port);
        } catch (RuntimeException e) {
            web.close();
            throw new InputError("cannot serve HTTP on " + bind + ":" + port + " (" + rootMessage(e) + "); choose another with "
                    + "--http-port, or 0 for any free port", e);
        }
    }

    private static String rootMessage(Throwable e) {
        Throwable t = e;
        while (t.getCause() != null) {
            t = t.getCause();
        }
        return t.getMessage() == null ? t.toString() : t.getMessage();
    }
}
