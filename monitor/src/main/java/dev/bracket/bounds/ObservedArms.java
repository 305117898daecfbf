package dev.bracket.bounds;

/**
 * What the data reveal in one cell (study × stratum × instrument level × window): the statistics
 * of the treated arm and of the untreated (control) arm. From them come the treated share
 * {@code p = n1 / (n1 + n0)} over the arms' units (exposed ones included, see
 * {@link ArmStatistics#units()}), {@code mu1 = E[Y | T = 1]} and {@code mu0 = E[Y | T = 0]}
 * (intervals when outcomes are pending, see {@link ArmMeanRange}).
 */
public record ObservedArms(ArmStatistics treated, ArmStatistics control) {

    private static final ObservedArms EMPTY = new ObservedArms(ArmStatistics.empty(), ArmStatistics.empty());

    public ObservedArms {
        if (treated == null || control == null) {
            throw new IllegalArgumentException("both arms are required");
        }
    }

    public static ObservedArms empty() {
        return EMPTY;
    }

    /** Adds up two cells arm by arm (Chan et al.'s merge, see {@link ArmStatistics#merge}). */
    public ObservedArms merge(ObservedArms other) {
        return new ObservedArms(treated.merge(other.treated), control.merge(other.control));
    }

    /** This cell plus one observation on the given arm. */
    public ObservedArms add(boolean isTreated, double outcome) {
        return isTreated
                ? new ObservedArms(treated.add(outcome), control)
                : new ObservedArms(treated, control.add(outcome));
    }

    /** This cell plus one exposure (a unit entering the given arm). */
    public ObservedArms addExposure(boolean isTreated) {
        return isTreated
                ? new ObservedArms(treated.withExposures(1), control)
                : new ObservedArms(treated, control.withExposures(1));
    }

    /** Units in both arms, pending ones included. */
    public long total() {
        return treated.units() + control.units();
    }

    /** Units of both arms whose outcome has not arrived. */
    public long pending() {
        return treated.pending() + control.pending();
    }

    /** True when either arm has no units: then no interval can be computed. */
    public boolean hasEmptyArm() {
        return treated.units() == 0 || control.units() == 0;
    }

    /** Treated share {@code p = n1 / (n1 + n0)} over units; 0 for the empty cell. */
    public double treatedShare() {
        long n = total();
        return n == 0 ? 0.0 : (double) treated.units() / n;
    }
}
