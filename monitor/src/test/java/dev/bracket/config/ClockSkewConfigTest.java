package dev.bracket.config;

import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.time.Duration;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

/** The top-level {@code max-clock-skew} key. */
class ClockSkewConfigTest {

    private static final String BASE = "studies:\n  - id: s\n    outcome: {min: 0, max: 1}\n";

    @Test
    @DisplayName("max-clock-skew defaults to one hour and takes any positive duration")
    void defaultAndValue() {
        assertThat(BracketConfig.parse("c.yaml", BASE).maxClockSkew()).isEqualTo(Duration.ofHours(1));
        assertThat(BracketConfig.parse("c.yaml", BASE + "max-clock-skew: 5m\n").maxClockSkew()).isEqualTo(Duration.ofMinutes(5));
    }

    @Test
    @DisplayName("a zero or negative max-clock-skew is refused with file:line:column")
    void mustBePositive() {
        assertThatThrownBy(() -> BracketConfig.parse("c.yaml", BASE + "max-clock-skew: 0s\n"))
                .isInstanceOf(ConfigError.class).hasMessageStartingWith("c.yaml:4:17: max-clock-skew must be longer than zero");
    }
}
