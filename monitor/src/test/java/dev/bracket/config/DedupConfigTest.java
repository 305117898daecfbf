package dev.bracket.config;

import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.time.Duration;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

/** The top-level {@code dedup-horizon} and {@code dedup-max-ids} keys. */
class DedupConfigTest {

    private static final String BASE = "studies:\n  - id: s\n    outcome: {min: 0, max: 1}\n";

    @Test
    @DisplayName("deduplication defaults to a 24 h horizon and 100,000 ids per partition; 0 turns it off")
    void defaultsAndOff() {
        DedupConfig d = BracketConfig.parse("c.yaml", BASE).dedup();
        assertThat(d.horizon()).isEqualTo(Duration.ofHours(24));
        assertThat(d.maxIds()).isEqualTo(100_000);
        assertThat(d.enabled()).isTrue();
        DedupConfig set = BracketConfig.parse("c.yaml", BASE + "dedup-horizon: 2h\ndedup-max-ids: 500\n").dedup();
        assertThat(set).isEqualTo(new DedupConfig(Duration.ofHours(2), 500));
        assertThat(BracketConfig.parse("c.yaml", BASE + "dedup-horizon: 0s\n").dedup().enabled()).isFalse();
    }

    @Test
    @DisplayName("a negative or huge horizon and a zero id limit are refused with file:line:column")
    void refusesBadValues() {
        assertThatThrownBy(() -> BracketConfig.parse("c.yaml", BASE + "dedup-horizon: PT-1H\n"))
                .isInstanceOf(ConfigError.class).hasMessageStartingWith("c.yaml:4:16: dedup-horizon must be from 0");
        assertThatThrownBy(() -> BracketConfig.parse("c.yaml", BASE + "dedup-horizon: 40000d\n"))
                .isInstanceOf(ConfigError.class).hasMessageContaining("36500d");
        assertThatThrownBy(() -> BracketConfig.parse("c.yaml", BASE + "dedup-max-ids: 0\n"))
                .isInstanceOf(ConfigError.class).hasMessageStartingWith("c.yaml:4:16: dedup-max-ids");
    }
}
