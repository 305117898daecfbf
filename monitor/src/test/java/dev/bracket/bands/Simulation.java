package dev.bracket.bands;

import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.ObservedArms;
import org.apache.commons.math3.random.RandomGenerator;

/** Draws samples of a cell from a known law: treatment with probability p, then an outcome from the arm's law. */
final class Simulation {

    private Simulation() {
    }

    static ObservedArms sample(RandomGenerator rng, int n, double p, OutcomeLaw treated, OutcomeLaw control) {
        ArmStatistics t = ArmStatistics.empty();
        ArmStatistics c = ArmStatistics.empty();
        for (int i = 0; i < n; i++) {
            if (rng.nextDouble() < p) {
                t = t.add(treated.draw(rng));
            } else {
                c = c.add(control.draw(rng));
            }
        }
        return new ObservedArms(t, c);
    }
}
