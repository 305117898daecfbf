package dev.bracket.bands;

import dev.bracket.bounds.AssumptionSet;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.bounds.StudyCells;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Map;
import java.util.Random;
import java.util.TreeMap;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The streaming monitor keeps statistics per Kafka partition and merges them.
 * Both bands are functions of per-cell counts, means and M2, which merge exactly in exact
 * arithmetic (Chan, Golub &amp; LeVeque 1979; count and count*mean simply add), so merged
 * partitions must give the band of one pass over all events, in any order, up to rounding.
 */
class MergeabilityTest {

    private static final OutcomeRange RANGE = new OutcomeRange(0, 10);
    private static final double TOLERANCE = 1e-12;

    /** One event: stratum, instrument level, arm and outcome. */
    private record Event(String stratum, String level, boolean treated, double outcome) {
    }

    @Test
    @DisplayName("partitions merged give the same bands as one pass, and event order does not matter")
    void mergedPartitionsMatchOnePass() {
        Random rng = new Random(5);
        List<Event> events = new ArrayList<>();
        for (int i = 0; i < 20_000; i++) {
            String stratum = rng.nextDouble() < 0.6 ? "north" : "south";
            String level = rng.nextBoolean() ? "assigned" : "not-assigned";
            boolean treated = rng.nextDouble() < (level.equals("assigned") ? 0.7 : 0.2);
            double outcome = Math.min(10, Math.max(0, (treated ? 6 : 5) + 2 * rng.nextGaussian()));
            events.add(new Event(stratum, level, treated, outcome));
        }
        StudyCells onePass = cells(events);
        List<Event> shuffled = new ArrayList<>(events);
        Collections.shuffle(shuffled, new Random(6));
        StudyCells reordered = cells(shuffled);
        StudyCells merged = StudyCells.empty();
        for (int partition = 0; partition < 4; partition++) {
            List<Event> mine = new ArrayList<>();
            for (int i = partition; i < events.size(); i += 4) {
                mine.add(events.get(i));
            }
            for (Map.Entry<String, Map<String, ObservedArms>> s : cells(mine).byStratum().entrySet()) {
                for (Map.Entry<String, ObservedArms> l : s.getValue().entrySet()) {
                    merged = merged.with(s.getKey(), l.getKey(), l.getValue());
                }
            }
        }
        BandConfig settings = BandConfig.both(0.9);
        for (String set : List.of("worst-case", "mtr-positive", "mts-negative,optimizing-selection", "mts-positive", "sorting-on-gains")) {
            AssumptionSet assumptions = AssumptionSet.parse(set);
            List<ConfidenceBand> expected = settings.bands(onePass, RANGE, assumptions);
            if (set.equals("worst-case")) {
                assertTrue(expected.stream().allMatch(ConfidenceBand::isBounded), "worst-case bands exist: " + expected);
            }
            assertSameBands(expected, settings.bands(merged, RANGE, assumptions));
            assertSameBands(expected, settings.bands(reordered, RANGE, assumptions));
            // Without instrument levels the fixed band takes the delta-method route; check that one too.
            StudyCells pooledLevels = StudyCells.empty()
                    .with("north", StudyCells.NONE, onePass.pooled("north")).with("south", StudyCells.NONE, onePass.pooled("south"));
            StudyCells pooledMerged = StudyCells.empty()
                    .with("north", StudyCells.NONE, merged.pooled("north")).with("south", StudyCells.NONE, merged.pooled("south"));
            assertSameBands(settings.bands(pooledLevels, RANGE, assumptions), settings.bands(pooledMerged, RANGE, assumptions));
        }
    }

    private static StudyCells cells(List<Event> events) {
        Map<String, Map<String, ObservedArms>> byCell = new TreeMap<>();
        for (Event e : events) {
            byCell.computeIfAbsent(e.stratum(), k -> new TreeMap<>())
                    .merge(e.level(), ObservedArms.empty().add(e.treated(), e.outcome()), (a, b) -> a.add(e.treated(), e.outcome()));
        }
        StudyCells cells = StudyCells.empty();
        for (Map.Entry<String, Map<String, ObservedArms>> s : byCell.entrySet()) {
            for (Map.Entry<String, ObservedArms> l : s.getValue().entrySet()) {
                cells = cells.with(s.getKey(), l.getKey(), l.getValue());
            }
        }
        return cells;
    }

    private static void assertSameBands(List<ConfidenceBand> expected, List<ConfidenceBand> actual) {
        assertEquals(expected.size(), actual.size());
        for (int i = 0; i < expected.size(); i++) {
            ConfidenceBand e = expected.get(i);
            ConfidenceBand a = actual.get(i);
            assertEquals(e.method(), a.method());
            assertEquals(e.status(), a.status());
            assertEquals(e.lower(), a.lower(), TOLERANCE, e.method().id() + " lower");
            assertEquals(e.upper(), a.upper(), TOLERANCE, e.method().id() + " upper");
        }
    }
}
