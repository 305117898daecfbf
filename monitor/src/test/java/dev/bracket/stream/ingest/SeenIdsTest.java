package dev.bracket.stream.ingest;

import dev.bracket.stream.transaction.PartialsCodec;
import dev.bracket.config.DedupConfig;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.time.Duration;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

import static org.assertj.core.api.Assertions.assertThat;

/** Remembering counted event ids: the horizon in event time, the id limit, and what a commit writes and a restore reads. */
class SeenIdsTest {

    private static final long HOUR = 3_600_000L;

    @Test
    @DisplayName("a repeated (study, id) is refused within the horizon and counted again once the stream time has passed it")
    void horizonInEventTime() {
        SeenIds ids = new SeenIds(new DedupConfig(Duration.ofHours(1), 100));
        assertThat(ids.firstSighting("a", "e-1", 0, Long.MIN_VALUE)).isTrue();
        assertThat(ids.firstSighting("a", "e-1", 0, 0)).isFalse();
        assertThat(ids.firstSighting("b", "e-1", 0, 0)).as("same id, other study").isTrue();
        assertThat(ids.firstSighting("a", "e-1", 0, HOUR)).as("exactly one horizon later: still remembered").isFalse();
        assertThat(ids.firstSighting("a", "e-1", 0, HOUR + 1)).as("beyond the horizon").isTrue();
        ids.forgetExpired(3 * HOUR);
        assertThat(ids.size()).isZero();
    }

    @Test
    @DisplayName("beyond the id limit the earliest counted id is forgotten first, and the commit writes that as a tombstone")
    void limitForgetsEarliestFirst() {
        SeenIds ids = new SeenIds(new DedupConfig(Duration.ofHours(1), 2));
        ids.firstSighting("a", "1", 0, 0);
        ids.firstSighting("a", "2", 0, 0);
        ids.markClean();
        ids.firstSighting("a", "3", 0, 0);
        Map<SeenIds.Key, Long> written = new LinkedHashMap<>();
        ids.forEachChange(written::put);
        assertThat(written).containsEntry(new SeenIds.Key("a", "3"), 0L).containsEntry(new SeenIds.Key("a", "1"), null).hasSize(2);
        assertThat(ids.size()).isEqualTo(2);
        assertThat(ids.firstSighting("a", "2", 0, 0)).isFalse();
        assertThat(ids.firstSighting("a", "1", 0, 0)).as("forgotten: counts again").isTrue();
    }

    @Test
    @DisplayName("ids written by a commit and read back through the partials codec refuse the same repeats after a restore")
    void restoreThroughCodec() {
        SourcePartition src = new SourcePartition("events", 3);
        SeenIds before = new SeenIds(new DedupConfig(Duration.ofHours(1), 3));
        for (String id : List.of("x", "y", "z", "w")) { // "x" is forgotten (limit 3)
            before.firstSighting("s", id, 10, 10);
        }
        Map<SeenIds.Key, Long> restored = new LinkedHashMap<>();
        before.forEachChange((key, time) -> PartialsCodec.decode(PartialsCodec.seenKey(src, key), PartialsCodec.seenValue(time),
                new PartialsCodec.Sink() {
                    @Override
                    public void pane(SourcePartition source, PaneKey k, dev.bracket.bounds.ObservedArms arms) {
                    }

                    @Override
                    public void progress(SourcePartition source, SourceProgress progress) {
                    }

                    @Override
                    public void seen(SourcePartition source, SeenIds.Key k, Long t) {
                        assertThat(source).isEqualTo(src);
                        restored.remove(k);
                        if (t != null) {
                            restored.put(k, t);
                        }
                    }
                }));
        SeenIds after = new SeenIds(new DedupConfig(Duration.ofHours(1), 3));
        after.restore(restored);
        assertThat(after.size()).isEqualTo(3);
        assertThat(after.firstSighting("s", "y", 10, 10)).isFalse();
        assertThat(after.firstSighting("s", "w", 10, 10)).isFalse();
        assertThat(after.firstSighting("s", "x", 10, 10)).isTrue();
    }
}
