package dev.bracket.broker;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;

/**
 * {@code bracket monitor} in a child JVM on the test class path, so that tests can stop it with
 * SIGTERM ({@link Process#destroy}) or kill it with SIGKILL ({@link Process#destroyForcibly}).
 */
public final class ChildMonitor {

    private ChildMonitor() {
    }

    /**
     * Starts the monitor on {@code config}, its output (stdout and stderr) going to {@code log}.
     *
     * @param maxHeap the child's {@code -Xmx}, e.g. {@code 256m}
     */
    public static Process start(Path config, Path log, String maxHeap) throws IOException {
        String java = Path.of(System.getProperty("java.home"), "bin", "java").toString();
        String classpath = System.getProperty("surefire.test.class.path", System.getProperty("java.class.path"));
        return new ProcessBuilder(java, "-Xmx" + maxHeap, "-cp", classpath, "dev.bracket.cli.BracketCommand",
                "monitor", "--config", config.toString(), "--http-port", "0")
                .redirectErrorStream(true)
                .redirectOutput(log.toFile())
                .start();
    }

    /** What a child wrote so far; empty before it wrote anything. */
    public static String log(Path log) throws IOException {
        return Files.exists(log) ? Files.readString(log) : "";
    }
}
