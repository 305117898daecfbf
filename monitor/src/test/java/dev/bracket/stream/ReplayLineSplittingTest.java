package dev.bracket.stream;

import dev.bracket.stream.ingest.RejectReason;

import dev.bracket.config.BracketConfig;
import dev.bracket.demo.DemoProducer;
import dev.bracket.demo.JsonlFileFeed;
import org.apache.kafka.clients.producer.MockProducer;
import org.apache.kafka.common.serialization.StringSerializer;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.io.ByteArrayInputStream;
import java.nio.charset.StandardCharsets;
import java.time.Clock;

import static org.assertj.core.api.Assertions.assertThat;

/**
 * {@code replay} and {@code demo-producer --from-file} read one file as the same records: every
 * line end ({@code \r\n}, lone {@code \r}, {@code \n}), blank lines, form feed and vertical tab
 * lines (not JSON whitespace, RFC 8259 section 2), a last line without an end.
 */
class ReplayLineSplittingTest {

    private static final String FILE = "{\"study\":\"s\",\"unit\":1,\"treated\":true,\"outcome\":0.8}\r\n" // 1: CRLF
            + "{\"study\":\"s\",\"unit\":2,\"treated\":true,\"outcome\":0.6}\r"                // 2: lone CR
            + "{\"study\":\"s\",\"unit\":3,\"treated\":false,\"outcome\":0.5}\n"               // 3: LF
            + "\n"                                                                            // 4: empty
            + " \t \r\n"                                                                      // 5: blank
            + "\f\r\n"                                                                        // 6: form feed
            + "\u000B\r"                                                                      // 7: vertical tab, lone CR
            + "\r\n"                                                                          // 8: empty
            + "{\"study\":\"s\",\"unit\":4,\"treated\":false,\"outcome\":0.3}";                // 9: no line end

    @Test
    @DisplayName("the records replay reads are the records the producer sends, with the same line numbers for the bad ones")
    void sameRecords() throws Exception {
        BracketConfig config = BracketConfig.parse("c.yaml", "studies:\n  - id: s\n    outcome: {min: 0, max: 1}\n");
        Replay replay = new Replay(config, config.inputs().get(0).fields(), 10, 0);
        replay.read("f", new ByteArrayInputStream(FILE.getBytes(StandardCharsets.UTF_8)));
        Replay.Result result = replay.finish();

        MockProducer<String, String> kafka = new MockProducer<>(true, null, new StringSerializer(), new StringSerializer());
        JsonlFileFeed feed = new JsonlFileFeed(new ByteArrayInputStream(FILE.getBytes(StandardCharsets.UTF_8)));
        new DemoProducer(kafka, "t", 0, Clock.systemUTC()).run(feed, DemoProducer.Limits.NONE, () -> false);

        assertThat(result.accepted()).isEqualTo(4);
        assertThat(result.rejectedTotal()).isEqualTo(2);
        assertThat(kafka.history()).hasSize(6);
        assertThat(feed.malformed()).isEqualTo(result.rejectedTotal());
        assertThat(result.rejected()).extracting(Replay.Rejected::line).containsExactly(6L, 7L);
        assertThat(result.rejected()).extracting(Replay.Rejected::reason).containsOnly(RejectReason.BAD_JSON);
        assertThat(feed.firstMalformedLine()).isEqualTo(6);
    }
}
