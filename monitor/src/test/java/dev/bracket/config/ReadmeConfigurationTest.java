package dev.bracket.config;

import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatCode;

/**
 * Every configuration a new user may copy parses: each {@code ```yaml} block of the README and
 * the shipped examples ({@code examples/bracket.yaml}, {@code dashboards/monitor.yaml}), loaded
 * by the same parser the monitor uses.
 */
@DisplayName("The README's YAML blocks and the shipped example configurations parse")
class ReadmeConfigurationTest {

    private static final Path ROOT = Path.of("..");
    private static final Pattern YAML_BLOCK = Pattern.compile("```yaml\\n(.*?)```", Pattern.DOTALL);

    @Test
    @DisplayName("every ```yaml block of README.md is a valid configuration")
    void readmeBlocksParse() throws Exception {
        String readme = Files.readString(ROOT.resolve("README.md"));
        List<String> blocks = new ArrayList<>();
        Matcher m = YAML_BLOCK.matcher(readme);
        while (m.find()) {
            blocks.add(m.group(1));
        }
        assertThat(blocks).as("yaml blocks in README.md").hasSizeGreaterThanOrEqualTo(2);
        for (int i = 0; i < blocks.size(); i++) {
            String block = blocks.get(i);
            String name = "README.md yaml block " + (i + 1);
            assertThatCode(() -> BracketConfig.parse(name, block)).as(name + ":\n" + block).doesNotThrowAnyException();
        }
    }

    @Test
    @DisplayName("examples/bracket.yaml runs on the embedded broker; dashboards/monitor.yaml points at docker-compose's broker")
    void shippedExamplesParse() throws Exception {
        BracketConfig local = BracketConfig.load(ROOT.resolve("examples/bracket.yaml"));
        assertThat(local.usesEmbeddedBroker()).isTrue();
        assertThat(local.study("host-rollout")).isPresent();
        BracketConfig compose = BracketConfig.load(ROOT.resolve("dashboards/monitor.yaml"));
        assertThat(compose.usesEmbeddedBroker()).isFalse();
    }
}
