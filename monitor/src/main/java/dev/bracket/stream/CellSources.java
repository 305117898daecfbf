package dev.bracket.stream;

import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.ObservedArms;

import java.util.Arrays;

/**
 * The latest statistics of each source partition for one cell, packed into two arrays: a cell
 * usually has one source or a few, and a map per cell cost the updater more heap than the
 * numbers themselves. Counts are kept as doubles, exact up to 2^53.
 */
final class CellSources {

    /** Per source: treated count, mean, m2, min, max, then the same for control. */
    private static final int FIELDS = 10;

    private SourcePartition[] sources;
    private double[] stats;

    CellSources(SourcePartition source, ObservedArms arms) {
        sources = new SourcePartition[] {source};
        stats = new double[FIELDS];
        write(0, arms);
    }

    /** Replaces (or adds) {@code source}'s statistics. */
    void put(SourcePartition source, ObservedArms arms) {
        int i = indexOf(source);
        if (i < 0) {
            i = sources.length;
            sources = Arrays.copyOf(sources, i + 1);
            stats = Arrays.copyOf(stats, (i + 1) * FIELDS);
            sources[i] = source;
        }
        write(i, arms);
    }

    /** Drops {@code source}'s statistics; true when no source is left. */
    boolean remove(SourcePartition source) {
        int i = indexOf(source);
        if (i >= 0) {
            int last = sources.length - 1;
            sources[i] = sources[last];
            System.arraycopy(stats, last * FIELDS, stats, i * FIELDS, FIELDS);
            sources = Arrays.copyOf(sources, last);
            stats = Arrays.copyOf(stats, last * FIELDS);
        }
        return sources.length == 0;
    }

    /** The sum over sources ({@link ObservedArms#merge}). */
    ObservedArms sum() {
        ObservedArms sum = ObservedArms.empty();
        for (int i = 0; i < sources.length; i++) {
            sum = sum.merge(new ObservedArms(arm(i * FIELDS), arm(i * FIELDS + FIELDS / 2)));
        }
        return sum;
    }

    private int indexOf(SourcePartition source) {
        for (int i = 0; i < sources.length; i++) {
            if (sources[i].equals(source)) {
                return i;
            }
        }
        return -1;
    }

    private void write(int i, ObservedArms arms) {
        write(i * FIELDS, arms.treated());
        write(i * FIELDS + FIELDS / 2, arms.control());
    }

    private void write(int at, ArmStatistics a) {
        stats[at] = a.count();
        stats[at + 1] = a.mean();
        stats[at + 2] = a.m2();
        stats[at + 3] = a.min();
        stats[at + 4] = a.max();
    }

    private ArmStatistics arm(int at) {
        long n = (long) stats[at];
        return n == 0 ? ArmStatistics.empty() : new ArmStatistics(n, stats[at + 1], stats[at + 2], stats[at + 3], stats[at + 4]);
    }
}
