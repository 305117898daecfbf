package dev.bracket.bounds;

import java.util.Collections;
import java.util.HashMap;
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
    /** Sums kept from construction: bands and bounds ask for them many times per report. */
    private final Map<String, ObservedArms> pooledByStratum;
    private final ObservedArms pooled;
    /** Kept from construction like the sums: every band of every assumption set asks. */
    private final boolean pending;
    private final boolean instrument;

    private StudyCells(Map<String, Map<String, ObservedArms>> cells) {
        this.cells = cells;
        Map<String, ObservedArms> byStratum = new HashMap<>(); // looked up by name many times per report
        ObservedArms all = ObservedArms.empty();
        boolean anyPending = false;
        boolean anyInstrument = false;
        for (Map.Entry<String, Map<String, ObservedArms>> e : cells.entrySet()) { // name order, as the sums always were
            ObservedArms stratum = ObservedArms.empty();
            anyInstrument |= e.getValue().size() > 1 || !e.getValue().containsKey(NONE);
            for (ObservedArms arms : e.getValue().values()) {
                stratum = stratum.merge(arms);
                anyPending |= arms.pending() > 0;
            }
            byStratum.put(e.getKey(), stratum);
            all = all.merge(stratum);
        }
        this.pooledByStratum = Collections.unmodifiableMap(byStratum);
        this.pooled = all;
        this.pending = anyPending;
        this.instrument = anyInstrument;
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
        Builder b = new Builder();
        cells.forEach((s, levels) -> levels.forEach((l, a) -> b.add(s, l, a)));
        return b.add(stratum, level, arms).build();
    }

    /**
     * Collects cells, merging arms added twice to one cell in the order added (as {@link #with}
     * does), and builds the value once: adding n cells by {@code with} would copy them n times.
     */
    public static final class Builder {
        private final Map<String, Map<String, ObservedArms>> cells = new TreeMap<>();

        public Builder add(String stratum, String level, ObservedArms arms) {
            cells.computeIfAbsent(stratum, k -> new TreeMap<>()).merge(level, arms, ObservedArms::merge);
            return this;
        }

        public StudyCells build() {
            Map<String, Map<String, ObservedArms>> copy = new TreeMap<>();
            cells.forEach((s, levels) -> copy.put(s, Collections.unmodifiableMap(new TreeMap<>(levels))));
            return new StudyCells(Collections.unmodifiableMap(copy));
        }
    }

    /** Stratum name to (instrument level to arms), in name order. */
    public Map<String, Map<String, ObservedArms>> byStratum() {
        return cells;
    }

    /** True when the data name more than one instrument level in some stratum. */
    public boolean hasInstrument() {
        return instrument;
    }

    /** All cells of one stratum added together (instrument levels pooled). */
    public ObservedArms pooled(String stratum) {
        return pooledByStratum.getOrDefault(stratum, ObservedArms.empty());
    }

    /** True when some cell has exposed units whose outcome has not arrived ({@link ObservedArms#pending()}). */
    public boolean hasPending() {
        return pending;
    }

    /** Every cell added together. */
    public ObservedArms pooled() {
        return pooled;
    }
}
