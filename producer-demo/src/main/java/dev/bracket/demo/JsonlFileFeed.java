package dev.bracket.demo;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;

import dev.bracket.lines.JsonLines;

import java.io.Closeable;
import java.io.IOException;
import java.io.InputStream;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.time.Instant;

/**
 * Sends a file of JSON lines as it is. The monitor, not the producer, validates events: a line
 * that is not a JSON object still goes out (the monitor puts it on its rejected topic with the
 * reason) and is counted here so the user hears about it. Lines are split by {@link JsonLines},
 * exactly as {@code bracket replay} splits them; blank lines are not records. Records are keyed by
 * their {@code unit} field when it is there.
 */
public final class JsonlFileFeed implements EventFeed, Closeable {

    private static final ObjectMapper MAPPER = new ObjectMapper();

    private final JsonLines lines;
    private long malformed;
    private long firstMalformedLine;

    public JsonlFileFeed(InputStream in) {
        this.lines = new JsonLines(in);
    }

    @Override
    public KeyedLine next(Instant now) {
        JsonLines.Line line;
        try {
            line = lines.next();
        } catch (IOException e) {
            throw new UncheckedIOException("reading the file: " + e.getMessage(), e);
        }
        if (line == null) {
            return null;
        }
        String value = new String(line.bytes(), StandardCharsets.UTF_8);
        return new KeyedLine(unitOf(value, line.number()), value);
    }

    private String unitOf(String line, long lineNumber) {
        try {
            JsonNode node = MAPPER.readTree(line);
            if (node != null && node.isObject()) {
                JsonNode unit = node.get("unit");
                return unit != null && unit.isValueNode() ? unit.asText() : null;
            }
        } catch (IOException notJson) {
            // counted below; the monitor reports the reason
        }
        if (malformed++ == 0) {
            firstMalformedLine = lineNumber;
        }
        return null;
    }

    /** Lines sent that are not JSON objects. */
    public long malformed() {
        return malformed;
    }

    /** Line number of the first such line, 0 when there was none. */
    public long firstMalformedLine() {
        return firstMalformedLine;
    }

    @Override
    public void close() throws IOException {
        lines.close();
    }
}
