package dev.bracket.bounds;

import net.jqwik.api.Arbitraries;
import net.jqwik.api.Arbitrary;
import net.jqwik.api.Combinators;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import net.jqwik.api.Provide;

import static org.junit.jupiter.api.Assertions.assertTrue;

/** Arms at the edges (one unit, huge counts, means at the range ends) never give NaN or an interval outside [a - b, b - a]. */
class ExtremeCellsProperties {

    @Provide
    Arbitrary<ObservedArms> extremeArms() {
        // Counts from 1 to huge, means at or near the range ends, spreads zero.
        Arbitrary<Long> count = Arbitraries.oneOf(Arbitraries.longs().between(1, 3), Arbitraries.longs().between(1, Long.MAX_VALUE / 4));
        Arbitrary<Double> mean = Arbitraries.oneOf(Arbitraries.of(-1.0, 3.0), Arbitraries.doubles().between(-1, 3).ofScale(9));
        return Combinators.combine(count, mean, count, mean)
                .as((n1, m1, n0, m0) -> new ObservedArms(ArmStatistics.ofSummary(n1, m1, 0), ArmStatistics.ofSummary(n0, m0, 0)));
    }

    @Property(tries = 500)
    void identifiedIntervalsAreFinite(@ForAll("extremeArms") ObservedArms arms, @ForAll Direction better) {
        OutcomeRange range = new OutcomeRange(-1, 3, better);
        for (AssumptionSet set : AssumptionSet.eachSingle()) {
            IdentifiedInterval iv = BoundCalculator.interval(arms, range, set);
            if (iv.isBounded()) {
                assertTrue(Double.isFinite(iv.lower()) && Double.isFinite(iv.upper()), set + " " + iv);
                // Any ATE of outcomes in [a, b] lies in [a - b, b - a].
                assertTrue(iv.lower() >= -4 - 1e-12 && iv.upper() <= 4 + 1e-12, set + " " + iv);
            }
        }
    }
}
