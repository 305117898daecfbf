package dev.bracket.stream.ingest;

import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

import java.time.OffsetDateTime;
import java.util.Random;

import static org.assertj.core.api.Assertions.assertThat;

class IsoTimeTest {

    private static long parse(String s) {
        return IsoTime.parseMillis(s.toCharArray(), 0, s.length());
    }

    @ParameterizedTest
    @ValueSource(strings = {"2024-02-29T23:59:59Z", "1970-01-01T00:00:00Z", "1969-12-31T23:59:59.999Z", "2025-01-01T12:00:00.5+05:30",
            "2000-03-01T00:00:00-08:00", "2038-01-19T03:14:08.123456789Z", "1600-02-29T00:00:00Z", "2024-06-30T10:00Z"})
    @DisplayName("agrees with java.time on offsets, fractions, leap days and the shapes it hands over")
    void agreesWithJavaTime(String text) {
        // Reference: java.time.OffsetDateTime (JDK), outside the fast path.
        assertThat(parse(text)).isEqualTo(OffsetDateTime.parse(text).toInstant().toEpochMilli());
    }

    @Test
    @DisplayName("agrees with java.time on random instants and offsets")
    void agreesOnRandomInstants() {
        Random rnd = new Random(9);
        for (int i = 0; i < 20_000; i++) {
            long millis = rnd.nextLong() % 8_000_000_000_000L;
            int offsetMinutes = (rnd.nextInt(37) - 18) * 30;
            String text = java.time.Instant.ofEpochMilli(millis)
                    .atOffset(java.time.ZoneOffset.ofTotalSeconds(offsetMinutes * 60)).toString();
            assertThat(parse(text)).as(text).isEqualTo(millis);
        }
    }

    @ParameterizedTest
    @ValueSource(strings = {"2023-02-29T00:00:00Z", "2024-13-01T00:00:00Z", "2024-01-01T25:00:00Z", "2024-01-01 00:00:00Z",
            "2024-01-01T00:00:00", "yesterday", "2024-01-01T00:61:00Z", "2024-01-01T00:00:00+25:00"})
    @DisplayName("rejects impossible dates, missing offsets and other text")
    void rejectsInvalid(String text) {
        assertThat(parse(text)).isEqualTo(IsoTime.INVALID);
    }
}
