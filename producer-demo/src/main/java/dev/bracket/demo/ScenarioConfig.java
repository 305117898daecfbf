package dev.bracket.demo;

/**
 * The knobs of the rollout simulation. Invented for the demo; nothing here is data.
 *
 * @param hosts             how many hosts the service runs on
 * @param rolloutShare      share of hosts that get the new setting, in (0, 1)
 * @param selectionStrength correlation, in [-1, 1], between the engineers' preference for a host and
 *                          the host's health: 1 picks the healthiest hosts, -1 the least healthy,
 *                          0 picks as if at random (then the naive difference is unbiased)
 * @param effect            the average effect of the setting on the outcome, in [-0.5, 0.5]
 * @param strata            whether events carry the host's region as their stratum
 * @param seed              fixes the hosts, the engineers' picks and every outcome
 */
public record ScenarioConfig(int hosts, double rolloutShare, double selectionStrength, double effect,
                               boolean strata, long seed) {

    public static final int DEFAULT_HOSTS = 400;
    public static final double DEFAULT_ROLLOUT_SHARE = 0.3;
    public static final double DEFAULT_SELECTION = 0.7;
    public static final double DEFAULT_EFFECT = -0.08;

    public ScenarioConfig {
        if (hosts < 10 || hosts > 1_000_000) {
            throw new IllegalArgumentException("hosts must be between 10 and 1000000, was " + hosts);
        }
        if (!(rolloutShare > 0 && rolloutShare < 1)) {
            throw new IllegalArgumentException("rollout share must lie strictly between 0 and 1, was " + rolloutShare);
        }
        if (!(selectionStrength >= -1 && selectionStrength <= 1)) {
            throw new IllegalArgumentException("selection strength must lie in [-1, 1], was " + selectionStrength);
        }
        if (!(effect >= -0.5 && effect <= 0.5)) {
            throw new IllegalArgumentException("effect must lie in [-0.5, 0.5] (outcomes are shares in [0, 1]), was " + effect);
        }
        int treated = (int) Math.round(hosts * rolloutShare);
        if (treated < 1 || treated >= hosts) {
            throw new IllegalArgumentException("rollout share " + rolloutShare + " of " + hosts
                    + " hosts leaves one arm without hosts; choose a share nearer 0.5 or more hosts");
        }
    }

    /** The demo's defaults with the given seed. */
    public static ScenarioConfig defaults(long seed) {
        return new ScenarioConfig(DEFAULT_HOSTS, DEFAULT_ROLLOUT_SHARE, DEFAULT_SELECTION, DEFAULT_EFFECT, false, seed);
    }

    /** Hosts that get the setting: the rounded share, at least one and fewer than all. */
    public int treatedHosts() {
        return (int) Math.round(hosts * rolloutShare);
    }
}
