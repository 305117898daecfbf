package dev.bracket.shipped;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.TimeUnit;

import static org.assertj.core.api.Assertions.assertThat;

/**
 * The packaged {@code bracket.jar}, run as a user runs it: {@code java -jar bracket.jar ARGS} in
 * a child JVM with this JVM's {@code java}, standard output and error kept in files of the test's
 * directory. Closing kills the child (and anything it started) if it is still running.
 */
final class JarProcess implements AutoCloseable {

    private static final ObjectMapper JSON = new ObjectMapper();
    private static final HttpClient HTTP = HttpClient.newBuilder().connectTimeout(Duration.ofSeconds(5)).build();

    private final Process process;
    private final Path out;
    private final Path err;

    private JarProcess(Process process, Path out, Path err) {
        this.process = process;
        this.out = out;
        this.err = err;
    }

    /** The jar under test: the one {@code mvn verify} packaged (failsafe passes its path). */
    static Path shippedJar() {
        String path = System.getProperty("bracket.jar");
        assertThat(path).as("system property bracket.jar (set by the failsafe plugin in monitor/pom.xml)").isNotNull();
        assertThat(Path.of(path)).as("the packaged jar").isRegularFile();
        return Path.of(path);
    }

    /** Starts {@code java -jar jar args} in {@code dir}; {@code name} names its output files. Temporary files go to {@code dir}. */
    static JarProcess start(Path jar, Path dir, String name, String... args) throws IOException {
        List<String> command = new ArrayList<>(List.of(Path.of(System.getProperty("java.home"), "bin", "java").toString(),
                "-Xmx384m", "-Djava.io.tmpdir=" + dir, "-jar", jar.toString()));
        command.addAll(List.of(args));
        Path out = dir.resolve(name + ".out");
        Path err = dir.resolve(name + ".err");
        Process p = new ProcessBuilder(command).directory(dir.toFile())
                .redirectOutput(out.toFile()).redirectError(err.toFile()).start();
        return new JarProcess(p, out, err);
    }

    static JarProcess start(Path dir, String name, String... args) throws IOException {
        return start(shippedJar(), dir, name, args);
    }

    String out() {
        return read(out);
    }

    String err() {
        return read(err);
    }

    private static String read(Path file) {
        try {
            return Files.readString(file);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    boolean isAlive() {
        return process.isAlive();
    }

    /** The exit code of a child that has ended. */
    int exitCode() {
        return process.exitValue();
    }

    /** Waits for the child to end by itself, failing the test if it has not within {@code limit}; returns its exit code. */
    int awaitExit(Duration limit) throws InterruptedException {
        boolean ended = process.waitFor(limit.toMillis(), TimeUnit.MILLISECONDS);
        assertThat(ended).as("ended within %s; stdout:%n%s%nstderr:%n%s", limit, out(), err()).isTrue();
        assertCompleteJar();
        return exitCode();
    }

    /** Sends SIGTERM, as Ctrl-C or a service manager would, and waits for the child to end; returns its exit code. */
    int stop(Duration limit) throws InterruptedException {
        process.destroy();
        return awaitExit(limit);
    }

    /** Fails when the child could not load a class: the jar lacks something it needs at run time. */
    void assertCompleteJar() {
        String all = out() + err();
        assertThat(all).as("a class missing from the jar at run time").doesNotContain("NoClassDefFoundError").doesNotContain("ClassNotFoundException");
    }

    /** GET of a JSON document from the child's HTTP server. */
    static JsonNode getJson(String url) throws IOException, InterruptedException {
        HttpResponse<String> r = HTTP.send(HttpRequest.newBuilder(URI.create(url)).timeout(Duration.ofSeconds(10)).build(),
                HttpResponse.BodyHandlers.ofString());
        assertThat(r.statusCode()).as("GET %s: %s", url, r.body()).isEqualTo(200);
        return JSON.readTree(r.body());
    }

    @Override
    public void close() throws InterruptedException {
        process.descendants().forEach(ProcessHandle::destroyForcibly);
        process.destroyForcibly();
        process.waitFor(30, TimeUnit.SECONDS);
    }
}
