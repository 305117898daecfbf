package dev.bracket.stream.transaction;

import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.stream.ingest.PaneKey;
import dev.bracket.stream.ingest.SeenIds;
import dev.bracket.stream.ingest.SourcePartition;
import dev.bracket.stream.ingest.SourceProgress;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.util.ArrayList;
import java.util.List;
import java.util.Map;

import static org.assertj.core.api.Assertions.assertThat;

/** Panes and seen ids read from a partition their study does not map to (an older layout) are not counted. */
class PlacementCheckTest {

    @Test
    @DisplayName("only panes and seen ids of the partition's own studies pass; progress always passes")
    void dropsMisplacedPanes() {
        List<String> passed = new ArrayList<>();
        PartialsCodec.Sink next = new PartialsCodec.Sink() {
            @Override
            public void pane(SourcePartition source, PaneKey key, ObservedArms arms) {
                passed.add(key.study());
            }

            @Override
            public void progress(SourcePartition source, SourceProgress progress) {
                passed.add("progress");
            }

            @Override
            public void seen(SourcePartition source, SeenIds.Key key, Long time) {
                passed.add("seen " + key.study());
            }
        };
        // "ab" maps to partition 1 of 4 (3105 mod 4, see PartialsCodecTest); "zzzzzz" to 0 of 4 (floorMod(-685785664, 4)).
        assertThat(PartialsCodec.partitionFor("zzzzzz", 4)).isZero();
        PlacementCheck check = new PlacementCheck("partials", 1, 4, next);
        ObservedArms arms = new ObservedArms(ArmStatistics.of(1.0), ArmStatistics.of(0.0));
        SourcePartition src = new SourcePartition("in", 0);
        check.pane(src, new PaneKey("ab", "", "", "cumulative", 0), arms);
        check.pane(src, new PaneKey("zzzzzz", "", "", "cumulative", 0), arms);
        check.pane(src, new PaneKey("zzzzzz", "", "", "cumulative", 0), null);
        check.progress(src, new SourceProgress(5L, Map.of()));
        check.seen(src, new SeenIds.Key("ab", "e-1"), 7L);
        check.seen(src, new SeenIds.Key("zzzzzz", "e-2"), 7L);
        assertThat(passed).containsExactly("ab", "progress", "seen ab");
    }
}
