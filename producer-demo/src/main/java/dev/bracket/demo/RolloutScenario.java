package dev.bracket.demo;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.Comparator;
import java.util.List;
import java.util.SplittableRandom;
import java.util.stream.IntStream;

/**
 * An invented rollout: a service turns a new setting on for some of its hosts, and on-call
 * engineers choose which. The outcome of a unit (one host over one reporting interval) is the
 * share of requests that met the latency objective, in [0, 1], higher is better.
 *
 * <p>The engineers lean towards healthy hosts (or, with negative strength, towards troubled
 * ones), and a host's health drives both of its potential outcomes. So the treated hosts would
 * have done better even without the setting, and the naive difference of means is biased. The
 * setting helps struggling hosts more than healthy ones, so its effect varies between hosts.
 *
 * <p>Everything the monitor cannot see is kept here: both potential outcomes of every unit and
 * the population quantities in {@link TrueEffects}, so a demo can print the truth beside the
 * intervals and a test can check that an interval covers it. Independent of Kafka and of the
 * clock; not thread-safe (one producer thread draws units).
 */
public final class RolloutScenario {

    /** Regions used as strata, with their baseline offsets: part of the invented world. */
    private static final String[] REGIONS = {"east", "central", "west"};
    private static final double[] REGION_OFFSET = {0.02, 0.0, -0.03};

    private static final double BASELINE = 0.85;
    private static final double HEALTH_SLOPE = 0.06;
    /** How much more the setting helps a host per unit of baseline shortfall. */
    private static final double GAIN_SLOPE = 0.5;
    private static final double NOISE = 0.08;
    private static final double EDGE = 0.02;

    private final ScenarioConfig settings;
    private final List<Host> hosts;
    private final long[] nextInterval;
    private final SplittableRandom draws;
    private final TrueEffects truth;

    public RolloutScenario(ScenarioConfig settings) {
        this.settings = settings;
        SplittableRandom build = new SplittableRandom(settings.seed());
        this.draws = build.split();
        this.hosts = buildHosts(settings, build);
        this.nextInterval = new long[hosts.size()];
        this.truth = computeTruth(hosts);
    }

    private static List<Host> buildHosts(ScenarioConfig s, SplittableRandom rng) {
        int n = s.hosts();
        double[] health = new double[n];
        int[] region = new int[n];
        double[] control = new double[n];
        for (int i = 0; i < n; i++) {
            health[i] = rng.nextGaussian();
            region[i] = rng.nextInt(REGIONS.length);
            control[i] = clip(BASELINE + REGION_OFFSET[region[i]] + HEALTH_SLOPE * health[i]);
        }
        double meanControl = Arrays.stream(control).average().orElseThrow();

        // The engineers' preference: correlated with health by the selection strength.
        double s2 = s.selectionStrength();
        double[] preference = new double[n];
        for (int i = 0; i < n; i++) {
            preference[i] = s2 * health[i] + Math.sqrt(1 - s2 * s2) * rng.nextGaussian();
        }
        boolean[] picked = new boolean[n];
        IntStream.range(0, n).boxed()
                .sorted(Comparator.comparingDouble((Integer i) -> preference[i]).reversed())
                .limit(s.treatedHosts())
                .forEach(i -> picked[i] = true);

        List<Host> out = new ArrayList<>(n);
        for (int i = 0; i < n; i++) {
            double treated = clip(control[i] + s.effect() + GAIN_SLOPE * (meanControl - control[i]));
            double noise = Math.min(NOISE, Math.min(Math.min(control[i], 1 - control[i]), Math.min(treated, 1 - treated)));
            out.add(new Host(String.format("host-%04d", i), REGIONS[region[i]], health[i], control[i], treated, noise, picked[i]));
        }
        return List.copyOf(out);
    }

    private static double clip(double mean) {
        return Math.max(EDGE, Math.min(1 - EDGE, mean));
    }

    /** Population means over host-intervals; every host reports intervals at the same rate. */
    private static TrueEffects computeTruth(List<Host> hosts) {
        double ate = hosts.stream().mapToDouble(Host::effect).average().orElseThrow();
        List<Host> on = hosts.stream().filter(Host::treated).toList();
        List<Host> off = hosts.stream().filter(h -> !h.treated()).toList();
        return new TrueEffects(ate,
                (double) on.size() / hosts.size(),
                on.stream().mapToDouble(Host::treatedMean).average().orElseThrow(),
                off.stream().mapToDouble(Host::controlMean).average().orElseThrow(),
                off.stream().mapToDouble(Host::treatedMean).average().orElseThrow(),
                on.stream().mapToDouble(Host::controlMean).average().orElseThrow());
    }

    public ScenarioConfig settings() {
        return settings;
    }

    public List<Host> hosts() {
        return hosts;
    }

    public TrueEffects truth() {
        return truth;
    }

    /**
     * The next host-interval: a host drawn uniformly, and one noise draw shared by both arms, so
     * {@code Y1 - Y0} equals the host's effect and both outcomes stay inside [0, 1].
     */
    public SimulatedUnit nextUnit() {
        int i = draws.nextInt(hosts.size());
        Host host = hosts.get(i);
        double u = 2 * draws.nextDouble() - 1;
        return new SimulatedUnit(host, nextInterval[i]++, host.treatedMean() + host.noise() * u,
                host.controlMean() + host.noise() * u);
    }

    /** A one-paragraph description for people, with the numbers of this run. */
    public String describe() {
        return String.format(java.util.Locale.ROOT,
                "A new setting reaches %d of %d hosts, picked by on-call engineers (selection strength %+.2f: %s). "
                        + "Outcome per host-interval: share of requests meeting the latency objective, in [0, 1], higher is better.",
                settings.treatedHosts(), settings.hosts(), settings.selectionStrength(),
                settings.selectionStrength() > 0 ? "healthier hosts first"
                        : settings.selectionStrength() < 0 ? "troubled hosts first" : "as if at random");
    }
}
