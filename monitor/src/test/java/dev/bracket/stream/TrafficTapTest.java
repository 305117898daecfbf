package dev.bracket.stream;

import dev.bracket.bounds.ObservedArms;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Set;

import static org.assertj.core.api.Assertions.assertThat;

/** Cumulative traffic per source becomes per-study increments for the owner, counted once. */
class TrafficTapTest {

    private final List<String> counted = new ArrayList<>();
    private final List<SourceProgress> passed = new ArrayList<>();
    private final PartialsCodec.Sink next = new PartialsCodec.Sink() {
        @Override
        public void cell(SourcePartition source, CellKey key, ObservedArms arms) {
        }

        @Override
        public void progress(SourcePartition source, SourceProgress progress) {
            passed.add(progress);
        }
    };

    private static SourceProgress traffic(String study, long accepted, long rejected, long outOfRange) {
        return new SourceProgress(1L, Map.of(), Map.of(study, new StudyTraffic(accepted, rejected, outOfRange), "other", new StudyTraffic(99, 9, 0)));
    }

    @Test
    @DisplayName("history read before going live only sets the baseline; later records count their increase, per source")
    void incrementsAfterGoingLive() {
        TrafficTap tap = new TrafficTap(next, Set.of("s"), (study, a, r, o) -> counted.add(study + " " + a + " " + r + " " + o));
        SourcePartition p0 = new SourcePartition("in", 0);
        SourcePartition p1 = new SourcePartition("in", 1);
        tap.progress(p0, traffic("s", 100, 10, 2));
        tap.goLive();
        tap.progress(p0, traffic("s", 130, 12, 3)); // +30 accepted, +2 rejected of which +1 out of range
        tap.progress(p1, traffic("s", 5, 0, 0));     // a source seen for the first time: all of it is new
        tap.progress(p0, traffic("s", 130, 12, 3)); // the same record again (e.g. written to every partition): nothing new
        assertThat(counted).containsExactly("s 30 2 1", "s 5 0 0");
        assertThat(passed).hasSize(4); // merged state still gets every record
    }
}
