package dev.bracket.demo;

import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import java.util.stream.LongStream;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

/**
 * The demo's simulation is checked against its own stated truth: both potential outcomes of
 * every unit are drawn, so sample averages must converge to the population values it reports
 * (law of large numbers; tolerances are 5 standard errors from the sample itself).
 */
class RolloutScenarioTest {

    private static final int UNITS = 200_000;

    /** Running mean and variance of a stream of numbers (Welford 1962). */
    private static final class Moments {
        long n;
        double mean;
        double m2;

        void add(double x) {
            n++;
            double d = x - mean;
            mean += d / n;
            m2 += d * (x - mean);
        }

        double standardError() {
            return Math.sqrt(m2 / (n - 1) / n);
        }
    }

    @Test
    @DisplayName("the average of Y1 - Y0 over simulated units converges to the stated true ATE")
    void empiricalAteConvergesToTruth() {
        RolloutScenario scenario = new RolloutScenario(ScenarioConfig.defaults(11));
        Moments effect = new Moments();
        for (int i = 0; i < UNITS; i++) {
            effect.add(scenario.nextUnit().effect());
        }
        assertThat(effect.mean).isCloseTo(scenario.truth().ate(), within(5 * effect.standardError()));
        // the effect varies between hosts, so the check is not trivially exact
        assertThat(effect.standardError()).isGreaterThan(0);
    }

    @Test
    @DisplayName("observed arm means and the two unobservable means converge to mu1, mu0, m10 and m01")
    void armMeansConvergeToTruth() {
        RolloutScenario scenario = new RolloutScenario(ScenarioConfig.defaults(12));
        Moments mu1 = new Moments();
        Moments mu0 = new Moments();
        Moments m10 = new Moments();
        Moments m01 = new Moments();
        long treated = 0;
        for (int i = 0; i < UNITS; i++) {
            SimulatedUnit u = scenario.nextUnit();
            if (u.treated()) {
                treated++;
                mu1.add(u.observedOutcome());
                m01.add(u.controlOutcome());
            } else {
                mu0.add(u.observedOutcome());
                m10.add(u.treatedOutcome());
            }
        }
        TrueEffects truth = scenario.truth();
        assertThat(mu1.mean).isCloseTo(truth.treatedMean(), within(5 * mu1.standardError()));
        assertThat(mu0.mean).isCloseTo(truth.controlMean(), within(5 * mu0.standardError()));
        assertThat(m10.mean).isCloseTo(truth.m10(), within(5 * m10.standardError()));
        assertThat(m01.mean).isCloseTo(truth.m01(), within(5 * m01.standardError()));
        double p = truth.treatedShare();
        double binomialSe = Math.sqrt(p * (1 - p) / UNITS);
        assertThat((double) treated / UNITS).isCloseTo(p, within(5 * binomialSe));
    }

    @Test
    @DisplayName("the stated truth satisfies ATE = p*mu1 + (1-p)*m10 - (1-p)*mu0 - p*m01")
    void truthSatisfiesTheAteDecomposition() {
        // Decomposition of the ATE by treatment arm (Manski 1990, AER P&P).
        for (long seed = 1; seed <= 10; seed++) {
            TrueEffects t = new RolloutScenario(ScenarioConfig.defaults(seed)).truth();
            double p = t.treatedShare();
            double decomposed = p * t.treatedMean() + (1 - p) * t.m10() - (1 - p) * t.controlMean() - p * t.m01();
            assertThat(decomposed).isCloseTo(t.ate(), within(1e-12));
        }
    }

    @Test
    @DisplayName("when engineers pick healthy hosts the naive difference overstates the effect, and understates it when they pick troubled ones")
    void selectionBiasesTheNaiveDifference() {
        for (long seed = 1; seed <= 20; seed++) {
            assertThat(truthFor(0.7, seed).selectionBias()).as("seed %d, healthy first", seed).isGreaterThan(0.02);
            assertThat(truthFor(-0.7, seed).selectionBias()).as("seed %d, troubled first", seed).isLessThan(-0.02);
        }
    }

    @Test
    @DisplayName("with picks unrelated to health the naive difference is unbiased on average over seeds")
    void noSelectionMeansNoBiasOnAverage() {
        Moments bias = new Moments();
        for (long seed = 1; seed <= 40; seed++) {
            bias.add(truthFor(0.0, seed).selectionBias());
        }
        assertThat(bias.mean).isCloseTo(0.0, within(4 * bias.standardError()));
        // and much smaller than under strong selection
        assertThat(Math.abs(bias.mean)).isLessThan(0.01);
    }

    @Test
    @DisplayName("the naive difference the monitor sees in the data converges to the stated biased value")
    void observedNaiveDifferenceMatchesStatedBias() {
        RolloutScenario scenario = new RolloutScenario(new ScenarioConfig(400, 0.3, 0.9, 0.0, false, 5));
        Moments treated = new Moments();
        Moments control = new Moments();
        for (int i = 0; i < UNITS; i++) {
            SimulatedUnit u = scenario.nextUnit();
            (u.treated() ? treated : control).add(u.observedOutcome());
        }
        double se = Math.hypot(treated.standardError(), control.standardError());
        assertThat(treated.mean - control.mean).isCloseTo(scenario.truth().naiveDifference(), within(5 * se));
        assertThat(treated.mean - control.mean - scenario.truth().ate()).isGreaterThan(20 * se);
    }

    @Test
    @DisplayName("with healthy hosts picked first, monotone treatment selection (positive) holds in the population")
    void positiveSelectionSatisfiesMts() {
        // MTS positive as a constraint on the unobservable means: m10 <= mu1 and m01 >= mu0
        // (Manski & Pepper 2000). The demo relies on it holding here.
        for (long seed = 1; seed <= 10; seed++) {
            TrueEffects t = truthFor(0.7, seed);
            assertThat(t.m10()).isLessThanOrEqualTo(t.treatedMean());
            assertThat(t.m01()).isGreaterThanOrEqualTo(t.controlMean());
        }
    }

    @Test
    @DisplayName("every potential outcome lies in [0, 1]")
    void outcomesStayInRange() {
        RolloutScenario scenario = new RolloutScenario(new ScenarioConfig(400, 0.3, 1.0, 0.5, true, 3));
        for (int i = 0; i < 50_000; i++) {
            SimulatedUnit u = scenario.nextUnit();
            assertThat(u.treatedOutcome()).isBetween(0.0, 1.0);
            assertThat(u.controlOutcome()).isBetween(0.0, 1.0);
        }
    }

    @Test
    @DisplayName("the same seed gives the same events, another seed different ones")
    void seededRunsAreReproducible() {
        Instant t = Instant.parse("2026-01-01T00:00:00Z");
        ScenarioConfig settings = new ScenarioConfig(400, 0.3, 0.7, -0.02, true, 42);
        assertThat(events(settings, t)).isEqualTo(events(settings, t));
        assertThat(new RolloutScenario(settings).truth()).isEqualTo(new RolloutScenario(settings).truth());
        ScenarioConfig other = new ScenarioConfig(400, 0.3, 0.7, -0.02, true, 43);
        assertThat(events(other, t)).isNotEqualTo(events(settings, t));
    }

    @Test
    @DisplayName("settings outside their ranges are refused with the allowed range in the message")
    void badSettingsAreRefused() {
        org.assertj.core.api.Assertions.assertThatThrownBy(() -> new ScenarioConfig(400, 0.3, 1.5, 0, false, 1))
                .hasMessageContaining("selection strength must lie in [-1, 1]");
        org.assertj.core.api.Assertions.assertThatThrownBy(() -> new ScenarioConfig(400, 1.0, 0.5, 0, false, 1))
                .hasMessageContaining("rollout share");
        org.assertj.core.api.Assertions.assertThatThrownBy(() -> new ScenarioConfig(400, 0.3, 0.5, 0.7, false, 1))
                .hasMessageContaining("effect must lie in [-0.5, 0.5]");
    }

    private static TrueEffects truthFor(double selection, long seed) {
        return new RolloutScenario(new ScenarioConfig(400, 0.3, selection, -0.02, false, seed)).truth();
    }

    private static List<String> events(ScenarioConfig settings, Instant t) {
        RolloutScenario scenario = new RolloutScenario(settings);
        List<String> out = new ArrayList<>();
        LongStream.range(0, 1000).forEach(i -> out.add(OutcomeEvent.observe("s", scenario.nextUnit(), t, true).toJson()));
        return out;
    }
}
