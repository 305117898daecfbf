package dev.bracket.stream.ingest;

import dev.bracket.stream.publish.MergedPartials;
import dev.bracket.stream.publish.WindowReport;
import dev.bracket.bands.BandConfig;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.Direction;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.config.FieldMapping;
import dev.bracket.config.StudyConfig;
import dev.bracket.config.WindowSpec;
import org.apache.commons.math3.stat.descriptive.SummaryStatistics;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.Random;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

class PartitionStateTest {

    private static final StudyConfig STUDY = new StudyConfig("s", new OutcomeRange(0, 10, Direction.HIGHER), List.of(AssumptionSet.parse("worst-case")));
    private static final WindowSpec MINUTE = new WindowSpec("minute", WindowSpec.Kind.TUMBLING, Duration.ofMinutes(1), Duration.ofMinutes(1));
    private static final WindowSpec THREE_MINUTES = new WindowSpec("three", WindowSpec.Kind.SLIDING, Duration.ofMinutes(3), Duration.ofMinutes(1));
    private static final long GRACE = 10_000;

    // No clock-skew limit: these events carry times from 1970 on and record time 0.
    private final EventParser parser = new EventParser(List.of(STUDY), FieldMapping.DEFAULT, 4096, Duration.ofMillis(Long.MAX_VALUE));
    private final List<String> late = new ArrayList<>();

    private PartitionState state(int partition) {
        return new PartitionState(new SourcePartition("t", partition), List.of(WindowSpec.CUMULATIVE, MINUTE, THREE_MINUTES), GRACE,
                (study, window) -> late.add(study.id() + "/" + window.name()));
    }

    private void add(PartitionState s, boolean treated, double y, long time) {
        String json = String.format(Locale.ROOT, "{\"study\":\"s\",\"unit\":\"u\",\"treated\":%s,\"outcome\":%s,\"time\":%d}", treated, y, time);
        ParsedEvent e = parser.parse(json.getBytes(StandardCharsets.UTF_8), 0);
        assertThat(e.isUsable()).as(e.detail()).isTrue();
        s.add(e);
    }

    @Test
    @DisplayName("cumulative statistics over two partitions, merged, match Commons Math over all outcomes")
    void cumulativeMatchesCommonsMath() {
        // Reference: Commons Math SummaryStatistics (mean, sample variance with n-1) over the same outcomes.
        Random rnd = new Random(7);
        PartitionState a = state(0);
        PartitionState b = state(1);
        SummaryStatistics treated = new SummaryStatistics();
        SummaryStatistics control = new SummaryStatistics();
        for (int i = 0; i < 20_000; i++) {
            boolean t = rnd.nextDouble() < 0.3;
            double y = Math.min(10, Math.max(0, 5 + rnd.nextGaussian() * 2 + (t ? 1 : 0)));
            add(i % 3 == 0 ? a : b, t, y, 1_000L * i);
            (t ? treated : control).addValue(y);
        }
        MergedPartials merged = new MergedPartials();
        for (PartitionState s : List.of(a, b)) {
            s.panes().forEach((k, arms) -> merged.pane(s.source(), k, arms));
        }
        ObservedArms arms = merged.cells("s", "cumulative", pane -> true).pooled();
        assertThat(arms.treated().count()).isEqualTo(treated.getN());
        assertThat(arms.control().count()).isEqualTo(control.getN());
        assertThat(arms.treated().mean()).isCloseTo(treated.getMean(), within(1e-12));
        assertThat(arms.control().mean()).isCloseTo(control.getMean(), within(1e-12));
        assertThat(arms.treated().variance()).isCloseTo(treated.getVariance(), within(1e-10));
        assertThat(arms.control().variance()).isCloseTo(control.getVariance(), within(1e-10));
        assertThat(arms.treated().min()).isEqualTo(treated.getMin());
        assertThat(arms.control().max()).isEqualTo(control.getMax());
    }

    @Test
    @DisplayName("with more cells than the lookup cache holds, equal names as other String objects, evictions and a restore in between, every cell matches Commons Math")
    void manyCellsMatchCommonsMath() {
        // Reference: Commons Math SummaryStatistics per stratum over the same outcomes.
        Random rnd = new Random(11);
        PartitionState s = state(0);
        int strata = 300;
        SummaryStatistics[] expected = new SummaryStatistics[strata];
        for (int i = 0; i < strata; i++) {
            expected[i] = new SummaryStatistics();
        }
        String[] names = new String[strata];
        for (int i = 0; i < strata; i++) {
            names[i] = "st" + i;
        }
        int k = 0;
        for (int i = 0; i < 60_000; i++) {
            if (rnd.nextInt(3) == 0) {
                k = rnd.nextInt(strata); // runs of events in one stratum, as in real streams
            }
            double y = rnd.nextDouble() * 10;
            ParsedEvent e = new ParsedEvent();
            e.reset();
            e.study = STUDY;
            e.stratum = rnd.nextBoolean() ? names[k] : new String(names[k]); // equal, not always identical
            e.instrument = "";
            e.treated = true;
            e.outcome = y;
            e.time = 1_000L * i;
            s.add(e);
            expected[k].addValue(y);
            if (i % 5_000 == 4_999) {
                assertThat(s.evictClosed()).isNotEmpty();
            }
            if (i == 30_000) {
                s.panes().forEach(s::restorePane);
            }
        }
        var cells = s.panes();
        for (int j = 0; j < strata; j++) {
            ObservedArms arms = cells.get(new PaneKey("s", names[j], "", "cumulative", 0));
            assertThat(arms.treated().count()).as(names[j]).isEqualTo(expected[j].getN());
            assertThat(arms.treated().mean()).as(names[j]).isCloseTo(expected[j].getMean(), within(1e-12));
        }
    }

    @Test
    @DisplayName("tumbling panes split by event time; an event later than the grace period counts in cumulative only")
    void tumblingPanesAndLateEvents() {
        PartitionState s = state(0);
        add(s, true, 1, 5_000);        // pane [0, 60 s)
        add(s, false, 2, 65_000);      // pane [60 s, 120 s)
        add(s, true, 3, 59_000);       // pane 0 closes at 60 s + 10 s grace; stream time 65 s: still open
        add(s, false, 4, 130_000);     // stream time 130 s: pane 0 is closed for "minute"
        add(s, true, 5, 50_000);       // late for "minute" (and not for the 3-minute sliding window)

        assertThat(late).containsExactly("s/minute");
        assertThat(s.progress().late()).containsEntry(new LateKey("s", "minute"), 1L);
        assertThat(s.progress().streamTime()).isEqualTo(130_000);
        var cells = s.panes();
        assertThat(cells.get(new PaneKey("s", "", "", "cumulative", 0)).total()).isEqualTo(5);
        assertThat(cells.get(new PaneKey("s", "", "", "minute", 0)).treated().count()).isEqualTo(2);
        assertThat(cells.get(new PaneKey("s", "", "", "three", 0)).treated().count()).isEqualTo(3);
    }

    @Test
    @DisplayName("a sliding report merges the panes of the last size/step steps ending at the watermark")
    void slidingWindowMergesRecentPanes() {
        PartitionState s = state(0);
        add(s, true, 1, 10_000);       // pane 0: outside the 3-minute window ending at 240 s
        add(s, true, 2, 70_000);       // pane 1
        add(s, false, 3, 130_000);     // pane 2
        add(s, false, 4, 190_000);     // pane 3 (holds the watermark)
        MergedPartials merged = new MergedPartials();
        s.panes().forEach((k, arms) -> merged.pane(s.source(), k, arms));
        merged.progress(s.source(), s.progress());

        WindowReport three = WindowReport.current(STUDY, THREE_MINUTES, merged, BandConfig.none());
        assertThat(three.start()).isEqualTo(60_000);
        assertThat(three.end()).isEqualTo(240_000);
        assertThat(three.report().pooled().treated().count()).isEqualTo(1);
        assertThat(three.report().pooled().control().count()).isEqualTo(2);
        WindowReport minute = WindowReport.current(STUDY, MINUTE, merged, BandConfig.none());
        assertThat(minute.report().pooled().total()).isEqualTo(1);
        assertThat(minute.report().rows().get(0).interval().isBounded()).isFalse();
        assertThat(WindowReport.current(STUDY, WindowSpec.CUMULATIVE, merged, BandConfig.none()).report().pooled().total()).isEqualTo(4);
    }

    @Test
    @DisplayName("closed panes are evicted once, the open ones and the cumulative cell stay")
    void evictsClosedPanes() {
        PartitionState s = state(0);
        add(s, true, 1, 1_000);
        add(s, true, 1, 250_000);
        List<PaneKey> closed = s.evictClosed();
        // Pane 0 closes for "minute" at 70 s and for "three" at 190 s; stream time is 250 s.
        assertThat(closed).containsExactlyInAnyOrder(new PaneKey("s", "", "", "minute", 0), new PaneKey("s", "", "", "three", 0));
        assertThat(s.evictClosed()).isEmpty();
        assertThat(s.panes()).containsKey(new PaneKey("s", "", "", "cumulative", 0)).hasSize(3);
    }

    @Test
    @DisplayName("restored cells continue exactly where the original left off")
    void restoreContinuesExactly() {
        PartitionState original = state(0);
        PartitionState copy = state(0);
        Random rnd = new Random(3);
        for (int i = 0; i < 1000; i++) {
            add(original, rnd.nextBoolean(), rnd.nextDouble() * 10, i);
        }
        original.panes().forEach(copy::restorePane);
        copy.restoreProgress(original.progress());
        for (int i = 0; i < 1000; i++) {
            boolean t = rnd.nextBoolean();
            double y = rnd.nextDouble() * 10;
            add(original, t, y, 1000 + i);
            add(copy, t, y, 1000 + i);
        }
        assertThat(copy.panes()).isEqualTo(original.panes());
        assertThat(copy.progress()).isEqualTo(original.progress());
    }
}
