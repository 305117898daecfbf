package dev.bracket.demo;

import picocli.CommandLine;
import picocli.CommandLine.Option;

/** The simulation's command-line options shared by {@code bracket demo} and {@code bracket demo-producer}. */
public final class ScenarioOptions {

    @Option(names = "--selection", paramLabel = "S", defaultValue = "" + ScenarioConfig.DEFAULT_SELECTION,
            description = "How strongly the engineers pick healthy hosts, from -1 (troubled first) through 0 (as if at random) to 1 (default: ${DEFAULT-VALUE}).")
    double selection;

    @Option(names = "--effect", paramLabel = "E", defaultValue = "" + ScenarioConfig.DEFAULT_EFFECT,
            description = "True average effect of the setting on the share of requests meeting the objective, in [-0.5, 0.5] (default: ${DEFAULT-VALUE}).")
    double effect;

    @Option(names = "--seed", paramLabel = "N", defaultValue = "1",
            description = "Fixes hosts, picks and outcomes; the same seed gives the same events (default: ${DEFAULT-VALUE}).")
    long seed;

    /**
     * The settings these options describe with the given rest; a value out of range is reported as
     * a usage error of the command, naming the flag.
     */
    public ScenarioConfig settings(int hosts, double rolloutShare, boolean strata, CommandLine command) {
        try {
            return new ScenarioConfig(hosts, rolloutShare, selection, effect, strata, seed);
        } catch (IllegalArgumentException e) {
            String m = e.getMessage();
            String flag = m.startsWith("selection") ? "--selection: " : m.startsWith("effect") ? "--effect: " : "";
            throw new CommandLine.ParameterException(command, flag + m);
        }
    }
}
