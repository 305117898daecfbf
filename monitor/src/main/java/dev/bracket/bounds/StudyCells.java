package dev.bracket.bounds;

import java.util.Collections;
import java.util.Map;
import java.util.TreeMap;

/**
 * All observed arms of one study (in one window), by stratum and instrument level. The empty
 * string names the only stratum of an unstratified study and the only level of a study without
 * an instrument. Immutable; {@link #with} returns a new value.
 */
public final class StudyCells {

    /** Name of the stratum or level used when the data carry none. */
    public static final String NONE = "";

    private static final StudyCells EMPTY = new StudyCells(Map.of());

    private final Map<String, Map<String, ObservedArms>> cells;

    private StudyCells(Map<String, Map<String, ObservedArms>> cells) {
        this.cells = cells;
    }

    public static StudyCells empty() {
        return EMPTY;
    }

    /** A study with a single cell. */
    public static StudyCells single(ObservedArms arms) {
        return EMPTY.with(NONE, NONE, arms);
    }

    /** This study with {@code arms} merged into the cell (stratum, level). */
    public StudyCells with(String stratum, String level, ObservedArms arms) {
        Map<String, Map<String, ObservedArms>> copy = new TreeMap<>();
        cells.forEach((s, levels) -> copy.put(s, new TreeMap<>(levels)));
        copy.computeIfAbsent(stratum, k -> new TreeMap<>()).merge(level, arms, ObservedArms::merge);
        copy.replaceAll((s, levels) -> Collections.unmodifiableMap(levels));
        return new StudyCells(Collections.unmodifiableMap(copy));
    }

    /** Stratum name to (instrument level to arms), in name order. */
    public Map<String, Map<String, ObservedArms>> byStratum() {
        return cells;
    }

    /** True when the data name more than one instrument level in some stratum. */
    public boolean hasInstrument() {
        return cells.values().stream().anyMatch(levels -> levels.size() > 1 || !levels.containsKey(NONE));
    }

    /** All cells of one stratum added together (instrument levels pooled). */
    public ObservedArms pooled(String stratum) {
        return cells.getOrDefault(stratum, Map.of()).values().stream()
                .reduce(ObservedArms.empty(), ObservedArms::merge);
    }

    /** True when some cell has exposed units whose outcome has not arrived ({@link ObservedArms#pending()}). */
    public boolean hasPending() {
        return cells.values().stream().flatMap(levels -> levels.values().stream()).anyMatch(arms -> arms.pending() > 0);
    }

    /** Every cell added together. */
    public ObservedArms pooled() {
        return cells.keySet().stream().map(this::pooled).reduce(ObservedArms.empty(), ObservedArms::merge);
    }
}
