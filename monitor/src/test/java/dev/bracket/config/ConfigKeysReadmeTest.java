package dev.bracket.config;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.dataformat.yaml.YAMLFactory;
import dev.bracket.alerts.AlertRule;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Arrays;
import java.util.Map;
import java.util.Set;
import java.util.TreeMap;
import java.util.TreeSet;
import java.util.stream.Collectors;

import static org.assertj.core.api.Assertions.assertThat;

/**
 * The README's configuration reference names exactly the keys defined in {@link ConfigKeys}: the
 * {@code ```yaml} block under "### Configuration (YAML)" and the first one under "## Alerts"
 * together hold every defined key and no other. Keys are compared by their dotted path (list
 * items are transparent: {@code studies.outcome.min}); below a key without defined sub-keys (the
 * verbatim {@code kafka} properties) nothing is compared.
 */
@DisplayName("The README's configuration reference names exactly the defined keys")
class ConfigKeysReadmeTest {

    private static final ObjectMapper YAML = new ObjectMapper(new YAMLFactory());

    @Test
    @DisplayName("the README's reference blocks name every defined key and no other")
    void readmeNamesExactlyTheDefinedKeys() throws Exception {
        String readme = Files.readString(Path.of("..", "README.md"));
        Set<String> named = new TreeSet<>();
        named.addAll(namedKeys(blockAfter(readme, "### Configuration (YAML)")));
        named.addAll(namedKeys(blockAfter(readme, "## Alerts")));
        Set<String> defined = defined().keySet();

        assertThat(difference(defined, named)).as("defined in ConfigKeys but missing from the README's reference blocks").isEmpty();
        assertThat(difference(named, defined)).as("in the README's reference blocks but not defined in ConfigKeys").isEmpty();
    }

    @Test
    @DisplayName("a reference block with a key left out is caught")
    void aMissingKeyIsCaught() throws Exception {
        String block = blockAfter(Files.readString(Path.of("..", "README.md")), "### Configuration (YAML)");
        String withoutGrace = block.lines().filter(l -> !l.startsWith("grace:")).collect(Collectors.joining("\n"));

        assertThat(namedKeys(block)).contains("grace", "studies.outcome.kind", "inputs.fields.instrument");
        assertThat(namedKeys(withoutGrace)).doesNotContain("grace");
    }

    @Test
    @DisplayName("the rules section defines one entry per alert rule")
    void everyAlertRuleHasItsKeys() {
        assertThat(ConfigKeys.Rules.KEYS.names())
                .containsExactlyElementsOf(Arrays.stream(AlertRule.values()).map(AlertRule::id).toList());
    }

    /** Every defined key by dotted path, mapped to whether it has sub-keys of its own. */
    private static Map<String, Boolean> defined() {
        Map<String, Boolean> out = new TreeMap<>();
        collect(ConfigKeys.Top.KEYS, "", out);
        return out;
    }

    private static void collect(ConfigSection section, String prefix, Map<String, Boolean> out) {
        for (ConfigKey<?> key : section.keys()) {
            String path = prefix + key.name();
            ConfigSection sub = key.type().keys();
            out.put(path, sub != null);
            if (sub != null) {
                collect(sub, path + ".", out);
            }
        }
    }

    private static Set<String> namedKeys(String block) throws Exception {
        Set<String> out = new TreeSet<>();
        walk(YAML.readTree(block), "", defined(), out);
        return out;
    }

    /** Records the keys of {@code node}; descends only below keys defined with sub-keys. */
    private static void walk(JsonNode node, String prefix, Map<String, Boolean> defined, Set<String> out) {
        if (node.isArray()) {
            node.forEach(item -> walk(item, prefix, defined, out));
            return;
        }
        node.fields().forEachRemaining(field -> {
            String path = prefix + field.getKey();
            out.add(path);
            if (defined.getOrDefault(path, false)) {
                walk(field.getValue(), path + ".", defined, out);
            }
        });
    }

    private static String blockAfter(String readme, String heading) {
        int at = readme.indexOf("\n" + heading + "\n");
        assertThat(at).as("heading '" + heading + "' in README.md").isNotNegative();
        int start = readme.indexOf("```yaml\n", at) + "```yaml\n".length();
        return readme.substring(start, readme.indexOf("```", start));
    }

    private static Set<String> difference(Set<String> a, Set<String> b) {
        Set<String> out = new TreeSet<>(a);
        out.removeAll(b);
        return out;
    }
}
