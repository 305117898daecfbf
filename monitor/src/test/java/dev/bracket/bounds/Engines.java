package dev.bracket.bounds;

/**
 * The two ways the property checks call the identification engine, so that each check runs
 * against {@link BoundCalculator} and, to show that it can fail, against a deliberately broken
 * variant defined beside the check.
 */
final class Engines {

    private Engines() {
    }

    /** Bounds from a cell's observable quantities: treated share and the arms' means. */
    @FunctionalInterface
    interface FromMeans {
        FromMeans REAL = BoundCalculator::interval;

        IdentifiedInterval interval(double p, double mu1, double mu0, OutcomeRange range, AssumptionSet assumptions);
    }

    /** Bounds from a cell's arms. */
    @FunctionalInterface
    interface FromArms {
        FromArms REAL = BoundCalculator::interval;

        IdentifiedInterval interval(ObservedArms arms, OutcomeRange range, AssumptionSet assumptions);
    }
}
