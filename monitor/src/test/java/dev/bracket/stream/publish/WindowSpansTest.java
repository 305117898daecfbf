package dev.bracket.stream.publish;

import dev.bracket.bands.BandConfig;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.Direction;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.config.StudyConfig;
import dev.bracket.config.WindowSpec;
import dev.bracket.stream.ingest.SourcePartition;
import dev.bracket.stream.ingest.SourceProgress;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.time.Duration;
import java.util.Arrays;
import java.util.List;
import java.util.Map;
import java.util.SplittableRandom;

import static org.assertj.core.api.Assertions.assertThat;

class WindowSpansTest {

    private static final StudyConfig STUDY = new StudyConfig("s", new OutcomeRange(0, 10, Direction.HIGHER), List.of(AssumptionSet.parse("worst-case")));
    private static final WindowSpec MINUTE = new WindowSpec("minute", WindowSpec.Kind.TUMBLING, Duration.ofMinutes(1), Duration.ofMinutes(1));
    private static final WindowSpec HOUR_BY_SEVEN_MINUTES = new WindowSpec("hour", WindowSpec.Kind.SLIDING, Duration.ofMinutes(63), Duration.ofMinutes(7));
    private static final SourcePartition SOURCE = new SourcePartition("events", 0);

    @Test
    @DisplayName("a watermark move counts as a change exactly when some window's report would show another event-time span")
    void movedWhenAReportSpanMoves() {
        List<WindowSpec> windows = List.of(WindowSpec.CUMULATIVE, MINUTE, HOUR_BY_SEVEN_MINUTES);
        WindowSpans spans = new WindowSpans(windows);
        MergedPartials merged = new MergedPartials();
        SplittableRandom rng = new SplittableRandom(5);
        long watermark = 1_735_689_600_000L;
        long[] before = null;
        int moves = 0;
        int stays = 0;
        for (int i = 0; i < 2_000; i++) {
            // Mostly small steps within a minute, sometimes across several panes.
            watermark += rng.nextInt(10) == 0 ? rng.nextLong(20 * 60_000L) : rng.nextLong(3_000);
            merged.progress(SOURCE, new SourceProgress(watermark, Map.of()));
            // The spans the published reports show: the reference for what time alone changes.
            long[] now = new long[windows.size() * 2];
            for (int w = 0; w < windows.size(); w++) {
                WindowReport r = WindowReport.current(STUDY, windows.get(w), merged, BandConfig.none());
                now[2 * w] = r.start();
                now[2 * w + 1] = r.end();
            }
            boolean expected = before == null || !Arrays.equals(before, now);
            assertThat(spans.moved(merged.watermark())).as("watermark %d", watermark).isEqualTo(expected);
            moves += expected ? 1 : 0;
            stays += expected ? 0 : 1;
            before = now;
        }
        assertThat(moves).as("both cases occur").isGreaterThan(100);
        assertThat(stays).isGreaterThan(100);
    }

    @Test
    @DisplayName("with the cumulative window only, time alone never changes a report")
    void cumulativeOnlyNeverMoves() {
        WindowSpans spans = new WindowSpans(List.of(WindowSpec.CUMULATIVE));
        assertThat(spans.moved(Long.MIN_VALUE)).isFalse();
        assertThat(spans.moved(1_735_689_600_000L)).isFalse();
        assertThat(spans.moved(1_735_689_600_000L + 86_400_000L)).isFalse();
    }
}
