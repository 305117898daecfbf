package dev.bracket.stream.ingest;

import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.Direction;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.config.FieldMapping;
import dev.bracket.config.StudyConfig;
import dev.bracket.config.WindowSpec;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.util.HashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.SplittableRandom;

import static org.assertj.core.api.Assertions.assertThat;

/**
 * {@link PartitionState}'s shortcuts (the last pane remembered per window instead of a division
 * per event, the cell hash computed once per event, the pane cache) against the rule written out
 * plainly: every event's pane by {@link WindowSpec#paneStart}, late when that pane plus size and
 * grace lies at or before the stream time, statistics folded by {@link ArmStatistics#add}. Seeded
 * event sequences go forward, jump back (late and not late), start at negative times and cross
 * panes often, so that remembered panes are wrong as often as right.
 */
class PartitionStatePanesPropertyTest {

    private static final List<StudyConfig> STUDIES = List.of(
            new StudyConfig("s", new OutcomeRange(0, 10, Direction.HIGHER), List.of(AssumptionSet.parse("worst-case"))),
            new StudyConfig("t", new OutcomeRange(-5, 5, Direction.HIGHER), List.of(AssumptionSet.parse("worst-case"))));
    private static final List<WindowSpec> WINDOWS = List.of(WindowSpec.CUMULATIVE,
            new WindowSpec("minute", WindowSpec.Kind.TUMBLING, Duration.ofMinutes(1), Duration.ofMinutes(1)),
            new WindowSpec("three", WindowSpec.Kind.SLIDING, Duration.ofMinutes(3), Duration.ofMinutes(1)),
            new WindowSpec("week", WindowSpec.Kind.TUMBLING, Duration.ofDays(7), Duration.ofDays(7)));
    private static final long GRACE = 5_000;

    // No clock-skew limit: times go back to before 1970.
    private final EventParser parser = new EventParser(STUDIES, FieldMapping.DEFAULT, 4096, Duration.ofMillis(Long.MAX_VALUE));

    @ParameterizedTest(name = "seed {0}")
    @ValueSource(longs = {1, 2, 3, 4, 5, 6, 7, 8})
    @DisplayName("panes and late counts equal the plain rule on seeded sequences (a failure names its seed)")
    void panesEqualThePlainRule(long seed) {
        SplittableRandom rnd = new SplittableRandom(seed);
        PartitionState state = new PartitionState(new SourcePartition("t", 0), WINDOWS, GRACE, (s, w) -> { });
        Map<PaneKey, ArmStatistics[]> expected = new HashMap<>();
        Map<LateKey, Long> expectedLate = new HashMap<>();
        long streamTime = Long.MIN_VALUE;
        long time = -1_000 * rnd.nextLong(60, 3_600); // before 1970: floor division, not truncation
        int backward = 0;
        int paneEdges = 0;
        for (int i = 0; i < 3_000; i++) {
            time += switch (rnd.nextInt(10)) {
                case 0 -> -rnd.nextLong(1, 400_000); // back: late for some windows, or not
                case 1 -> rnd.nextLong(60_000, 900_000); // a jump over panes
                case 6 -> 60_000 - Math.floorMod(time, 60_000L); // to the first millisecond of the next minute
                case 7 -> 59_999 - Math.floorMod(time, 60_000L); // to the last millisecond of this minute
                case 2, 3, 4 -> 1_000 * rnd.nextLong(0, 7);
                default -> rnd.nextLong(0, 7_000);
            };
            backward += time < streamTime ? 1 : 0;
            long minute = Math.floorMod(time, 60_000L);
            paneEdges += minute == 0 || minute == 59_999 ? 1 : 0;
            String study = rnd.nextInt(3) == 0 ? "t" : "s";
            String stratum = rnd.nextBoolean() ? "a" : "b";
            boolean treated = rnd.nextBoolean();
            double y = study.equals("s") ? rnd.nextInt(11) : rnd.nextDouble(-5, 5);
            String json = String.format(Locale.ROOT, "{\"study\":\"%s\",\"unit\":\"u\",\"treated\":%s,\"outcome\":%s,\"time\":%d,\"stratum\":\"%s\"}",
                    study, treated, y, time, stratum);
            ParsedEvent e = parser.parse(json.getBytes(StandardCharsets.UTF_8), 0);
            assertThat(e.isUsable()).as(e.detail()).isTrue();
            y = e.outcome();
            state.add(e);

            streamTime = Math.max(streamTime, time);
            for (WindowSpec w : WINDOWS) {
                long pane = WindowSpec.paneStart(time, w.paneMillis());
                if (w.kind() != WindowSpec.Kind.CUMULATIVE && pane + w.size().toMillis() + GRACE <= streamTime) {
                    expectedLate.merge(new LateKey(study, w.name()), 1L, Long::sum);
                    continue;
                }
                ArmStatistics[] arms = expected.computeIfAbsent(new PaneKey(study, stratum, "", w.name(), pane),
                        k -> new ArmStatistics[] {ArmStatistics.empty(), ArmStatistics.empty()});
                arms[treated ? 0 : 1] = arms[treated ? 0 : 1].add(y);
            }
        }
        Map<PaneKey, ObservedArms> panes = state.panes();
        assertThat(panes.keySet()).as("seed %d", seed).isEqualTo(expected.keySet());
        expected.forEach((key, arms) -> {
            assertThat(panes.get(key).treated()).as("seed %d, %s treated", seed, key).isEqualTo(arms[0]);
            assertThat(panes.get(key).control()).as("seed %d, %s control", seed, key).isEqualTo(arms[1]);
        });
        assertThat(state.progress().late()).as("seed %d", seed).isEqualTo(expectedLate);
        assertThat(state.streamTime()).isEqualTo(streamTime);
        // The sequences must exercise what the shortcuts could get wrong.
        assertThat(backward).as("events going back in time").isGreaterThan(100);
        assertThat(expectedLate).as("late events").isNotEmpty();
        assertThat(paneEdges).as("events on the first or last millisecond of a minute").isGreaterThan(50);
        assertThat(expected.keySet().stream().filter(k -> k.window().equals("minute")).count()).as("minute panes").isGreaterThan(100);
        assertThat(expected.keySet().stream().anyMatch(k -> k.paneStart() < 0)).as("panes before 1970").isTrue();
    }
}
