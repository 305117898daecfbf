package dev.bracket.stream.publish;

import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.stream.ingest.SourcePartition;
import org.apache.commons.math3.stat.descriptive.SummaryStatistics;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.util.Random;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

/** The packed per-source pane store against Commons Math over the raw observations of the sources it holds. */
class PaneSourcesTest {

    @Test
    @DisplayName("replacing and removing sources leaves the sum of exactly the sources still held")
    void sumOfHeldSources() {
        Random rnd = new Random(4);
        double[][] treated = new double[4][];
        double[][] control = new double[4][];
        SourcePartition[] src = new SourcePartition[4];
        PaneSources pane = null;
        for (int s = 0; s < 4; s++) {
            src[s] = new SourcePartition("in", s);
            treated[s] = rnd.doubles(20 + s, 0, 1).toArray();
            control[s] = rnd.doubles(30 - s, 0, 1).toArray();
            ObservedArms arms = new ObservedArms(ArmStatistics.of(treated[s]), ArmStatistics.of(control[s]));
            if (pane == null) {
                pane = new PaneSources(src[s], arms);
            } else {
                pane.put(src[s], arms);
            }
        }
        // Source 1 writes a newer cumulative value (it saw more events); source 2's pane is deleted.
        treated[1] = rnd.doubles(50, 0, 1).toArray();
        pane.put(src[1], new ObservedArms(ArmStatistics.of(treated[1]), ArmStatistics.of(control[1])));
        assertThat(pane.remove(src[2])).isFalse();
        SummaryStatistics t = new SummaryStatistics();
        SummaryStatistics c = new SummaryStatistics();
        for (int s : new int[] {0, 1, 3}) {
            for (double y : treated[s]) {
                t.addValue(y);
            }
            for (double y : control[s]) {
                c.addValue(y);
            }
        }
        ObservedArms sum = pane.sum();
        assertThat(sum.treated().count()).isEqualTo(t.getN());
        assertThat(sum.control().count()).isEqualTo(c.getN());
        assertThat(sum.treated().mean()).isCloseTo(t.getMean(), within(1e-12));
        assertThat(sum.control().m2()).isCloseTo(c.getVariance() * (c.getN() - 1), within(1e-10));
        assertThat(sum.treated().max()).isEqualTo(t.getMax());
        assertThat(pane.remove(src[0])).isFalse();
        assertThat(pane.remove(src[1])).isFalse();
        assertThat(pane.remove(src[3])).as("last source gone").isTrue();
        assertThat(pane.sum()).isEqualTo(ObservedArms.empty());
    }
}
