package dev.bracket.stream;

import dev.bracket.stream.ingest.RejectReason;
import dev.bracket.config.BracketConfig;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.io.ByteArrayInputStream;
import java.nio.charset.StandardCharsets;

import static org.assertj.core.api.Assertions.assertThat;

/** Deduplication by id when replaying files: the same rule as the monitor's, per partition (a file, or the files of one partition). */
class ReplayDedupTest {

    private static final String STUDIES = """
            studies:
              - id: s
                outcome: {min: 0, max: 1}
            """;
    private static final String LINES = """
            {"study":"s","id":"e-1","unit":1,"treated":true,"outcome":0.2,"time":1000}
            {"study":"s","id":"e-1","unit":1,"treated":true,"outcome":0.2,"time":1000}
            {"study":"s","id":"e-2","unit":2,"treated":false,"outcome":0.4,"time":2000}
            {"study":"s","id":"e-1","unit":1,"treated":true,"outcome":0.2,"time":1000}
            {"study":"s","unit":3,"treated":false,"outcome":0.6,"time":3000}
            {"study":"s","unit":3,"treated":false,"outcome":0.6,"time":3000}
            """;

    private static Replay.Result replay(String extra) throws Exception {
        BracketConfig config = BracketConfig.parse("r.yaml", STUDIES + extra);
        Replay replay = new Replay(config, config.inputs().get(0).fields(), 10, 0);
        replay.read("events.jsonl", new ByteArrayInputStream(LINES.getBytes(StandardCharsets.UTF_8)));
        return replay.finish();
    }

    @Test
    @DisplayName("an id sent three times counts once (two rejected as duplicate); events without id all count")
    void repeatedIdCountsOnce() throws Exception {
        Replay.Result r = replay("");
        assertThat(r.accepted()).isEqualTo(4); // e-1, e-2 and both events without id
        assertThat(r.rejectedByReason()).containsExactlyEntriesOf(java.util.Map.of(RejectReason.DUPLICATE, 2L));
        assertThat(r.rejected()).allSatisfy(x -> assertThat(x.detail()).contains("id 'e-1' of study 's' was already counted"));
    }

    @Test
    @DisplayName("dedup-horizon: 0 turns deduplication off: every copy counts")
    void offCountsEveryCopy() throws Exception {
        Replay.Result r = replay("dedup-horizon: 0s\n");
        assertThat(r.accepted()).isEqualTo(6);
        assertThat(r.rejectedByReason()).isEmpty();
    }

    @Test
    @DisplayName("files read as one partition share their ids; files read as two partitions do not")
    void idsAreRememberedPerPartition() throws Exception {
        BracketConfig config = BracketConfig.parse("r.yaml", STUDIES);
        String event = "{\"study\":\"s\",\"id\":\"e-1\",\"unit\":1,\"treated\":true,\"outcome\":0.2,\"time\":1000}\n";

        Replay onePartition = new Replay(config, config.inputs().get(0).fields(), 10, 0);
        onePartition.newPartition("a.jsonl");
        onePartition.readMore("a.jsonl", new ByteArrayInputStream(event.getBytes(StandardCharsets.UTF_8)));
        onePartition.readMore("b.jsonl", new ByteArrayInputStream(event.getBytes(StandardCharsets.UTF_8)));
        Replay.Result one = onePartition.finish();
        assertThat(one.accepted()).isEqualTo(1);
        assertThat(one.rejectedByReason()).containsExactlyEntriesOf(java.util.Map.of(RejectReason.DUPLICATE, 1L));

        Replay twoPartitions = new Replay(config, config.inputs().get(0).fields(), 10, 0);
        twoPartitions.read("a.jsonl", new ByteArrayInputStream(event.getBytes(StandardCharsets.UTF_8)));
        twoPartitions.read("b.jsonl", new ByteArrayInputStream(event.getBytes(StandardCharsets.UTF_8)));
        assertThat(twoPartitions.finish().accepted()).isEqualTo(2); // as on two input partitions of the monitor
    }
}
