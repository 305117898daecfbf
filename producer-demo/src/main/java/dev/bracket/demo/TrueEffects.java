package dev.bracket.demo;

/**
 * What the simulation knows and a real study never does, over the population of host-intervals
 * (every host equally likely to report an interval). With {@code p} the treated share,
 * {@code ATE = p*mu1 + (1-p)*m10 - (1-p)*mu0 - p*m01} (the decomposition by treatment arm, Manski 1990, AER P&P).
 *
 * @param ate              average treatment effect E[Y1 - Y0]
 * @param treatedShare     p, the share of host-intervals on hosts with the setting
 * @param treatedMean      mu1 = E[Y1 | T = 1], which the data estimate
 * @param controlMean      mu0 = E[Y0 | T = 0], which the data estimate
 * @param m10              E[Y1 | T = 0], never observed
 * @param m01              E[Y0 | T = 1], never observed
 */
public record TrueEffects(double ate, double treatedShare, double treatedMean, double controlMean,
                          double m10, double m01) {

    /** The difference of observed means the data converge to, {@code mu1 - mu0}. */
    public double naiveDifference() {
        return treatedMean - controlMean;
    }

    /** How far the naive difference is from the ATE because of who got the setting. */
    public double selectionBias() {
        return naiveDifference() - ate;
    }

    /** One line for people: the truth of this run and how far the naive comparison is off. */
    public String describe() {
        return String.format(java.util.Locale.ROOT,
                "true ATE %+.4f; the naive difference of means tends to %+.4f (selection bias %+.4f); "
                        + "unobservable means m10 = %.4f, m01 = %.4f; treated share %.3f",
                ate, naiveDifference(), selectionBias(), m10, m01, treatedShare);
    }
}
