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
import com.fasterxml.jackson.dataformat.yaml.YAMLParser;

import java.io.IOException;
import java.util.ArrayDeque;
import java.util.Deque;
import java.util.HashMap;
import java.util.Map;

/**
 * A parsed YAML file that can say where any of its nodes came from. Jackson's tree drops
 * locations, so {@link #locate} re-reads the text with the streaming parser and stops at the
 * token whose path equals the node's JSON pointer; errors are rare, so the second pass is cheap.
 */
final class YamlDocument {

    private static final YAMLFactory FACTORY = new YAMLFactory();
    /** Strict about repeated keys, so the tree can never silently keep only the last one. */
    private static final ObjectMapper MAPPER = new ObjectMapper(new YAMLFactory())
            .configure(JsonParser.Feature.STRICT_DUPLICATE_DETECTION, true);

    private final String source;
    private final String text;
    private final JsonNode root;

    private YamlDocument(String source, String text, JsonNode root) {
        this.source = source;
        this.text = text;
        this.root = root;
    }

    /**
     * Parses {@code text}; syntax errors, a key given twice in one mapping and YAML aliases become a
     * {@link ConfigError} with the position.
     */
    static YamlDocument parse(String source, String text) {
        try {
            checkKeysAndAliases(source, text);
            JsonNode root = MAPPER.readTree(text);
            return new YamlDocument(source, text, root == null ? MissingNode.getInstance() : root);
        } catch (JsonProcessingException e) {
            JsonLocation at = e.getLocation();
            String where = at == null ? source : source + ":" + at.getLineNr() + ":" + at.getColumnNr();
            throw new ConfigError(where + ": not valid YAML (" + e.getOriginalMessage().lines().findFirst().orElse("") + ")", e);
        } catch (IOException e) {
            throw new ConfigError(source + ": cannot be read (" + e.getMessage() + ")", e);
        }
    }

    /**
     * Refuses what is valid YAML but would not mean what it seems: a key given twice in one mapping
     * (one of the values would be dropped), and aliases ({@code *name}) and merge keys ({@code <<}),
     * which the tree reader does not expand: it reads an alias as the plain text {@code name}.
     */
    private static void checkKeysAndAliases(String source, String text) throws IOException {
        try (YAMLParser p = FACTORY.createParser(text)) {
            Deque<Map<String, String>> mappings = new ArrayDeque<>();
            for (JsonToken t = p.nextToken(); t != null; t = p.nextToken()) {
                JsonLocation at = p.currentTokenLocation();
                String where = source + ":" + at.getLineNr() + ":" + at.getColumnNr() + ": "
                        + ConfigNode.pathOf(p.getParsingContext().pathAsPointer());
                if (p.isCurrentAlias()) {
                    throw new ConfigError(where + " is the YAML alias *" + p.getText() + "; Bracket does not expand anchors (&)"
                            + " and aliases (*) in its configuration: write the value out here");
                }
                if (t == JsonToken.START_OBJECT) {
                    mappings.push(new HashMap<>());
                } else if (t == JsonToken.END_OBJECT) {
                    mappings.pop();
                } else if (t == JsonToken.FIELD_NAME) {
                    if (p.currentName().equals("<<")) {
                        throw new ConfigError(where + " is a YAML merge key, which Bracket does not expand: write the keys out here");
                    }
                    String first = mappings.peek().putIfAbsent(p.currentName(),
                            "line " + at.getLineNr() + ", column " + at.getColumnNr());
                    if (first != null) {
                        throw new ConfigError(where + " is given twice in one mapping (first at " + first + "); keep one");
                    }
                }
            }
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
