package dev.bracket.demo;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;

import java.io.BufferedReader;
import java.io.Closeable;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.time.Instant;

/**
 * Sends a file of JSON lines as it is. The monitor, not the producer, validates events: a line
 * that is not a JSON object still goes out (the monitor puts it on its rejected topic with the
 * reason) and is counted here so the user hears about it. Blank lines are not records and are
 * skipped. Records are keyed by their {@code unit} field when it is there.
 */
public final class JsonlFileFeed implements EventFeed, Closeable {

    private static final ObjectMapper MAPPER = new ObjectMapper();

    private final BufferedReader reader;
    private long lineNumber;
    private long malformed;
    private long firstMalformedLine;

    public JsonlFileFeed(BufferedReader reader) {
        this.reader = reader;
    }

    @Override
    public KeyedLine next(Instant now) {
        try {
            String line;
            do {
                line = reader.readLine();
                if (line == null) {
                    return null;
                }
                lineNumber++;
            } while (line.isBlank());
            return new KeyedLine(unitOf(line), line);
        } catch (IOException e) {
            throw new UncheckedIOException("reading line " + (lineNumber + 1) + ": " + e.getMessage(), e);
        }
    }

    private String unitOf(String line) {
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
        reader.close();
    }
}
