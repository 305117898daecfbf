package dev.bracket.stream.publish;

import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.stream.ingest.SourcePartition;

import java.util.Arrays;

/**
 * The latest statistics of each source partition for one pane, packed into two arrays: a pane
 * usually has one source or a few, and a map per pane cost the updater more heap than the
 * numbers themselves. Counts are kept as doubles, exact up to 2^53.
 */
final class PaneSources {

    /** Per source: treated count, mean, m2, min, max, then the same for control. */
    private static final int FIELDS = 10;

    /** The sources in the order of {@link #stats}: the one source itself (the usual case, no array), else an array. */
    private Object sources;
    private double[] stats;

    PaneSources(SourcePartition source, ObservedArms arms) {
        sources = source;
        stats = new double[FIELDS];
        write(0, arms);
    }

    /** Replaces (or adds) {@code source}'s statistics. */
    void put(SourcePartition source, ObservedArms arms) {
        int i = indexOf(source);
        if (i < 0) {
            SourcePartition[] all = all();
            i = all.length;
            all = Arrays.copyOf(all, i + 1);
            all[i] = source;
            sources = all;
            stats = Arrays.copyOf(stats, (i + 1) * FIELDS);
        }
        write(i, arms);
    }

    /** Drops {@code source}'s statistics; true when no source is left. */
    boolean remove(SourcePartition source) {
        int i = indexOf(source);
        if (i >= 0) {
            SourcePartition[] all = all();
            int last = all.length - 1;
            all[i] = all[last];
            System.arraycopy(stats, last * FIELDS, stats, i * FIELDS, FIELDS);
            sources = last == 1 ? all[0] : Arrays.copyOf(all, last);
            stats = Arrays.copyOf(stats, last * FIELDS);
        }
        return stats.length == 0;
    }

    /** The sum over sources ({@link ObservedArms#merge}). */
    ObservedArms sum() {
        ObservedArms sum = ObservedArms.empty();
        for (int at = 0; at < stats.length; at += FIELDS) {
            sum = sum.merge(new ObservedArms(arm(at), arm(at + FIELDS / 2)));
        }
        return sum;
    }

    private SourcePartition[] all() {
        return sources instanceof SourcePartition one ? new SourcePartition[] {one} : ((SourcePartition[]) sources).clone();
    }

    private int indexOf(SourcePartition source) {
        if (sources instanceof SourcePartition one) {
            return one.equals(source) ? 0 : -1;
        }
        SourcePartition[] all = (SourcePartition[]) sources;
        for (int i = 0; i < all.length; i++) {
            if (all[i].equals(source)) {
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
