package dev.bracket.cli;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.bracket.demo.EventFeed;
import dev.bracket.demo.RegistryScenario;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Instant;

import static org.assertj.core.api.Assertions.assertThat;

/**
 * The registry demo (invented data, known truth): replayed offline, the complete-case rows
 * (missing-at-random) miss the true effect and the pending-aware rows hold it.
 */
class RegistryScenarioTest {

    private static final ObjectMapper JSON = new ObjectMapper();

    @TempDir
    Path dir;

    @Test
    @DisplayName("complete-case intervals miss the true ATE 0.22; the pending-aware ones hold it")
    void pendingAwareRowsHoldTheTruth() throws Exception {
        EventFeed feed = new RegistryScenario(DemoCommand.STUDY, 7);
        StringBuilder events = new StringBuilder();
        for (int i = 0; i < 30_000; i++) {
            events.append(feed.next(Instant.EPOCH).value()).append('\n');
        }
        Path file = dir.resolve("registry.jsonl");
        Files.writeString(file, events.toString());
        Path config = dir.resolve("bracket.yaml");
        Files.writeString(config, DemoCommand.configYaml(DemoCommand.REGISTRY_ASSUMPTIONS) + "bands: none\n");
        CalcCommandTest.Run run = CalcCommandTest.run("replay", "--config", config.toString(), "--json", file.toString());
        assertThat(run.exitCode()).as(run.err()).isZero();
        JsonNode report = JSON.readTree(run.out()).get("reports").get(0);
        double truth = RegistryScenario.truth().ate();
        assertThat(truth).isEqualTo(0.22, org.assertj.core.api.Assertions.within(1e-12));
        assertThat(report.get("arms").get("treated").get("pending").asLong()).isPositive();
        for (JsonNode row : report.get("bounds")) {
            StringBuilder ids = new StringBuilder();
            row.get("assumptions").forEach(a -> ids.append(ids.isEmpty() ? "" : ",").append(a.asText()));
            boolean covers = row.get("lower").asDouble() <= truth && truth <= row.get("upper").asDouble();
            System.out.printf("%s: [%.4f, %.4f] covers %s%n", ids, row.get("lower").asDouble(), row.get("upper").asDouble(), covers);
            if (ids.toString().equals("mtr-positive,mts-positive,missing-at-random")) {
                assertThat(covers).as(ids.toString()).isFalse();
            } else {
                assertThat(covers).as(ids.toString()).isTrue();
            }
        }
    }
}
