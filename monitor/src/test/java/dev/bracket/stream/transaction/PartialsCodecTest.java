package dev.bracket.stream.transaction;

import dev.bracket.stream.ingest.LateKey;
import dev.bracket.stream.ingest.PaneKey;
import dev.bracket.stream.ingest.SourcePartition;
import dev.bracket.stream.ingest.SourceProgress;
import dev.bracket.stream.ingest.StudyTraffic;
import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.ObservedArms;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.util.ArrayList;
import java.util.List;
import java.util.Map;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

class PartialsCodecTest {

    private final List<Object[]> seen = new ArrayList<>();
    private final PartialsCodec.Sink sink = new PartialsCodec.Sink() {
        @Override
        public void pane(SourcePartition source, PaneKey key, ObservedArms arms) {
            seen.add(new Object[] {source, key, arms});
        }

        @Override
        public void progress(SourcePartition source, SourceProgress progress) {
            seen.add(new Object[] {source, progress});
        }
    };

    @Test
    @DisplayName("cells round-trip bit for bit, including awkward doubles and an empty arm")
    void cellsRoundTripExactly() {
        SourcePartition src = new SourcePartition("outcomes", 2);
        PaneKey key = new PaneKey("study \"x\"", "eu/west", "", "cumulative", 0);
        ArmStatistics treated = ArmStatistics.of(0.1, 0.2, 1.0 / 3, Math.PI, 4.9e-324);
        ObservedArms arms = new ObservedArms(treated, ArmStatistics.empty());
        PartialsCodec.decode(PartialsCodec.paneKey(src, key), PartialsCodec.paneValue(arms), sink);
        assertThat(seen).hasSize(1);
        assertThat(seen.get(0)[0]).isEqualTo(src);
        assertThat(seen.get(0)[1]).isEqualTo(key);
        ObservedArms back = (ObservedArms) seen.get(0)[2];
        assertThat(Double.doubleToRawLongBits(back.treated().mean())).isEqualTo(Double.doubleToRawLongBits(treated.mean()));
        assertThat(Double.doubleToRawLongBits(back.treated().m2())).isEqualTo(Double.doubleToRawLongBits(treated.m2()));
        assertThat(back).isEqualTo(arms);
        assertThat(PartialsCodec.sourceOf(PartialsCodec.paneKey(src, key))).isEqualTo(src);
    }

    @Test
    @DisplayName("a null value deletes a cell; progress keeps stream time, late counts, traffic and unattributed records")
    void tombstonesAndProgress() {
        SourcePartition src = new SourcePartition("t", 0);
        PaneKey key = new PaneKey("s", "", "", "hourly", 3_600_000);
        PartialsCodec.decode(PartialsCodec.paneKey(src, key), null, sink);
        assertThat(seen.get(0)[2]).isNull();
        SourceProgress p = new SourceProgress(123_456L, Map.of(new LateKey("s", "hourly"), 4L),
                Map.of("s", new StudyTraffic(10, 3, 1)), 5);
        PartialsCodec.decode(PartialsCodec.progressKey(src), PartialsCodec.progressValue(p), sink);
        assertThat(seen.get(1)[1]).isEqualTo(p);
        PartialsCodec.decode(PartialsCodec.progressKey(src), PartialsCodec.progressValue(SourceProgress.NONE), sink);
        assertThat(seen.get(2)[1]).isEqualTo(SourceProgress.NONE);
    }

    @Test
    @DisplayName("a study's cells go to the partition given by the JDK's specified String hash, whatever the source")
    void partitionByStudy() {
        // String.hashCode is specified in the JDK javadoc as s[0]*31^(n-1) + ... + s[n-1]:
        // "ab" -> 97*31 + 98 = 3105, and 3105 mod 4 = 1.
        assertThat(PartialsCodec.partitionFor("ab", 4)).isEqualTo(1);
        // A negative hash still gives a partition in range: "zzzzzz" -> -685785664 by the same
        // formula in 32-bit arithmetic, and floor(-685785664 mod 5) = 1 (Java's % would give -4).
        assertThat(PartialsCodec.partitionFor("zzzzzz", 5)).isEqualTo(1);
    }

    @Test
    @DisplayName("records of another format are refused, not misread")
    void refusesForeignRecords() {
        assertThatThrownBy(() -> PartialsCodec.decode("hello".getBytes(), "{}".getBytes(), sink)).isInstanceOf(IllegalArgumentException.class);
        assertThatThrownBy(() -> PartialsCodec.decode("[\"other\",\"t\",0]".getBytes(), "{}".getBytes(), sink))
                .isInstanceOf(IllegalArgumentException.class);
    }
}
