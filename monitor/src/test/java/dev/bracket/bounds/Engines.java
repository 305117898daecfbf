package dev.bracket.bounds;

import java.util.Map;

/**
 * The ways the property checks call the identification engine, so that each check runs against
 * the engine ({@link BoundCalculator}, {@link IndependentInstrumentBounds}) and, to show that it
 * can fail, against a deliberately broken variant defined beside the check.
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

    /** Bounds under an independent instrument from the levels' arms (level name to arms). */
    @FunctionalInterface
    interface FromLevels {
        FromLevels REAL = IndependentInstrumentBounds::interval;

        IdentifiedInterval interval(Map<String, ObservedArms> levels, OutcomeRange range, AssumptionSet assumptions);
    }
}
