package dev.bracket.demo;

/**
 * One host-interval with both of its potential outcomes. Only the simulation sees both; the
 * event sent to the monitor carries the one its arm reveals.
 *
 * @param host            the host that ran the interval
 * @param interval        the host's interval number, from 0
 * @param treatedOutcome  the outcome the interval has with the setting (Y1)
 * @param controlOutcome  the outcome the interval has without it (Y0)
 */
public record SimulatedUnit(Host host, long interval, double treatedOutcome, double controlOutcome) {

    /** Unit identifier, unique within a study: host and interval number. */
    public String unitId() {
        return host.id() + "/" + interval;
    }

    public boolean treated() {
        return host.treated();
    }

    /** The outcome the monitor observes: Y1 for treated hosts, Y0 for the others. */
    public double observedOutcome() {
        return host.treated() ? treatedOutcome : controlOutcome;
    }

    /** {@code Y1 - Y0} of this unit. */
    public double effect() {
        return treatedOutcome - controlOutcome;
    }
}
