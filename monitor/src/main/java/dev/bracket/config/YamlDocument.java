package dev.bracket.config;

import com.fasterxml.jackson.core.JsonLocation;
import com.fasterxml.jackson.core.JsonParser;
import com.fasterxml.jackson.core.JsonPointer;
import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.core.JsonToken;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.node.MissingNode;
import com.fasterxml.jackson.dataformat.yaml.YAMLFactory;

import java.io.IOException;

/**
 * A parsed YAML file that can say where any of its nodes came from. Jackson's tree drops
 * locations, so {@link #locate} re-reads the text with the streaming parser and stops at the
 * token whose path equals the node's JSON pointer; errors are rare, so the second pass is cheap.
 */
final class YamlDocument {

    private static final YAMLFactory FACTORY = new YAMLFactory();
    private static final ObjectMapper MAPPER = new ObjectMapper(FACTORY);

    private final String source;
    private final String text;
    private final JsonNode root;

    private YamlDocument(String source, String text, JsonNode root) {
        this.source = source;
        this.text = text;
        this.root = root;
    }

    /** Parses {@code text}; syntax errors become a {@link ConfigError} with the parser's position. */
    static YamlDocument parse(String source, String text) {
        try {
            JsonNode root = MAPPER.readTree(text);
            return new YamlDocument(source, text, root == null ? MissingNode.getInstance() : root);
        } catch (JsonProcessingException e) {
            JsonLocation at = e.getLocation();
            String where = at == null ? source : source + ":" + at.getLineNr() + ":" + at.getColumnNr();
            throw new ConfigError(where + ": not valid YAML (" + e.getOriginalMessage().lines().findFirst().orElse("") + ")", e);
        }
    }

    ConfigNode root() {
        return new ConfigNode(this, root, JsonPointer.empty());
    }

    String source() {
        return source;
    }

    /** "file:line:column" of the node at {@code pointer} (of its key when {@code key} is true). */
    String locate(JsonPointer pointer, boolean key) {
        try (JsonParser p = FACTORY.createParser(text)) {
            JsonToken t;
            while ((t = p.nextToken()) != null) {
                if (t == JsonToken.END_OBJECT || t == JsonToken.END_ARRAY || (t == JsonToken.FIELD_NAME) != key) {
                    continue;
                }
                if (p.getParsingContext().pathAsPointer().equals(pointer)) {
                    JsonLocation at = p.currentTokenLocation();
                    return source + ":" + at.getLineNr() + ":" + at.getColumnNr();
                }
            }
        } catch (IOException e) {
            // The text parsed once already; fall through to the file name alone.
        }
        return source;
    }
}
