package dev.bracket.stream.ingest;

import dev.bracket.bounds.ObservedArms;

/** Both arms of one pane in one source partition, and whether they changed since the last commit. */
final class PaneAccumulator {

    private final ArmAccumulator treated = new ArmAccumulator();
    private final ArmAccumulator control = new ArmAccumulator();
    private boolean dirty;

    void add(boolean isTreated, double outcome) {
        (isTreated ? treated : control).add(outcome);
        dirty = true;
    }

    void set(ObservedArms arms) {
        treated.set(arms.treated());
        control.set(arms.control());
    }

    ObservedArms snapshot() {
        return new ObservedArms(treated.snapshot(), control.snapshot());
    }

    boolean isDirty() {
        return dirty;
    }

    void markClean() {
        dirty = false;
    }
}
