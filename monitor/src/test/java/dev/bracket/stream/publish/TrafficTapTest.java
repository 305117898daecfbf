package dev.bracket.stream.publish;

import dev.bracket.bounds.ObservedArms;
import dev.bracket.stream.ingest.PaneKey;
import dev.bracket.stream.ingest.SourcePartition;
import dev.bracket.stream.ingest.SourceProgress;
import dev.bracket.stream.ingest.StudyEventCounts;
import dev.bracket.stream.ingest.StudyTraffic;
import dev.bracket.stream.transaction.PartialsCodec;
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
        public void pane(SourcePartition source, PaneKey key, ObservedArms arms) {
        }

        @Override
        public void progress(SourcePartition source, SourceProgress progress) {
            passed.add(progress);
        }
    };

    private final StudyEventCounts counts = new StudyEventCounts() {
        @Override
        public void counted(String study, long accepted, long rejected, long outOfRange) {
            counted.add(study + " " + accepted + " " + rejected + " " + outOfRange);
        }

        @Override
        public void unattributed(String study, long rejected) {
            counted.add(study + " unattributed " + rejected);
        }
    };

    private static SourceProgress traffic(String study, long accepted, long rejected, long outOfRange) {
        return traffic(study, accepted, rejected, outOfRange, 0);
    }

    private static SourceProgress traffic(String study, long accepted, long rejected, long outOfRange, long unattributed) {
        return new SourceProgress(1L, Map.of(), Map.of(study, new StudyTraffic(accepted, rejected, outOfRange),
                "other", new StudyTraffic(99, 9, 0)), unattributed);
    }

    @Test
    @DisplayName("history read before going live only sets the baseline; later records count their increase, per source")
    void incrementsAfterGoingLive() {
        TrafficTap tap = new TrafficTap(next, Set.of("s"), counts);
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

    @Test
    @DisplayName("records without a readable study count once per source increase for each study of the partition")
    void unattributedPerStudyOfThePartition() {
        TrafficTap tap = new TrafficTap(next, new java.util.TreeSet<>(Set.of("a", "b")), counts);
        SourcePartition p0 = new SourcePartition("in", 0);
        tap.progress(p0, traffic("a", 0, 0, 0, 4)); // history: baseline only
        tap.goLive();
        tap.progress(p0, traffic("a", 0, 0, 0, 7)); // 3 new ones: they may be any study's, so both hear of them
        tap.progress(p0, traffic("a", 0, 0, 0, 7)); // the same record again: nothing new
        assertThat(counted).containsExactly("a unattributed 3", "b unattributed 3");
    }
}
