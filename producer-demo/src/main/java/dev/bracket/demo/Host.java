package dev.bracket.demo;

/**
 * One simulated host. Its mean outcomes under both arms are fixed when the scenario is built;
 * each interval draws one noise value shared by both arms, so a host-interval's two potential
 * outcomes differ by exactly {@code treatedMean - controlMean}.
 *
 * @param id          host name, e.g. {@code host-0042}
 * @param region      the stratum carried by events when strata are on
 * @param health      latent health score (standard normal); the engineers' picks lean on it
 * @param controlMean mean outcome of this host's intervals without the setting
 * @param treatedMean mean outcome of this host's intervals with the setting
 * @param noise       half-width of the uniform interval-to-interval noise around either mean
 * @param treated     whether the engineers rolled the setting out to this host
 */
public record Host(String id, String region, double health, double controlMean, double treatedMean,
                   double noise, boolean treated) {

    /** The effect of the setting on this host's intervals, {@code treatedMean - controlMean}. */
    public double effect() {
        return treatedMean - controlMean;
    }
}
