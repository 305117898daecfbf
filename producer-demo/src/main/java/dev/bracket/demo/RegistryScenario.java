package dev.bracket.demo;

import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.node.ObjectNode;

import java.time.Duration;
import java.time.Instant;
import java.util.Locale;
import java.util.PriorityQueue;
import java.util.SplittableRandom;

/**
 * An invented registry with delayed outcomes, as a feed of exposure and outcome events. Patients
 * enter one every {@link #ENROLMENT_GAP} of simulated time and get the new treatment by coin
 * flip. A good outcome (1) is 45% likely without treatment; treatment turns a further 40% of the
 * bad outcomes good and never harms, so the true ATE is 0.22 and monotone treatment response
 * holds. Bad outcomes are reported after about two days, good ones after about sixty (both
 * exponential): good outcomes are the ones still pending, more so in the treated arm, so the
 * reported outcomes understate the treatment's benefit.
 *
 * <p>Each patient gives an exposure event when entering and an outcome event when the outcome is
 * reported, carrying the exposure time in {@code exposed}. Events are in simulated time,
 * starting at a fixed instant; the same seed gives the same events. All numbers are invented.
 */
public final class RegistryScenario implements EventFeed {

    /** Simulated time between two patients entering the registry. */
    public static final Duration ENROLMENT_GAP = Duration.ofMinutes(2);

    private static final double CONTROL_GOOD = 0.45;
    private static final double TURNED_GOOD = 0.40;
    private static final double BAD_DELAY_DAYS = 2;
    private static final double GOOD_DELAY_DAYS = 60;
    private static final Instant START = Instant.parse("2026-01-05T00:00:00Z");
    private static final ObjectMapper MAPPER = new ObjectMapper();

    private record Reported(Instant at, Instant exposed, String unit, boolean treated, int outcome) {
    }

    private final String study;
    private final SplittableRandom random;
    private final PriorityQueue<Reported> due = new PriorityQueue<>((a, b) -> a.at().compareTo(b.at()));
    private Instant clock = START;
    private long patients;

    public RegistryScenario(String study, long seed) {
        this.study = study;
        this.random = new SplittableRandom(seed);
    }

    /** The truth only a simulation knows: randomized, so the unobservable means equal the arms' own. */
    public static TrueEffects truth() {
        double treatedGood = CONTROL_GOOD + (1 - CONTROL_GOOD) * TURNED_GOOD;
        return new TrueEffects(treatedGood - CONTROL_GOOD, 0.5, treatedGood, CONTROL_GOOD, treatedGood, CONTROL_GOOD);
    }

    /** One paragraph for people. */
    public static String describe() {
        return String.format(Locale.ROOT, "Invented registry: patients enter every %d minutes of simulated time and get a new"
                        + " treatment by coin flip; it turns %.0f%% of bad outcomes good and never harms. Bad outcomes are reported"
                        + " after about %.0f days, good ones after about %.0f, so good outcomes are the ones still pending."
                        + " Rows with missing-at-random assume pending outcomes look like reported ones; the others let them be anything.",
                ENROLMENT_GAP.toMinutes(), 100 * TURNED_GOOD, BAD_DELAY_DAYS, GOOD_DELAY_DAYS);
    }

    /** The next event in simulated time: an outcome that has come due, else a new patient's exposure. */
    @Override
    public KeyedLine next(Instant now) {
        ObjectNode o = MAPPER.createObjectNode();
        Reported r = due.peek();
        if (r != null && !r.at().isAfter(clock)) {
            due.poll();
            o.put("study", study);
            o.put("unit", r.unit());
            o.put("treated", r.treated());
            o.put("outcome", r.outcome());
            o.put("time", r.at().toString());
            o.put("exposed", r.exposed().toString());
            return line(r.unit(), o);
        }
        String unit = "patient-" + (++patients);
        boolean treated = random.nextBoolean();
        boolean goodUntreated = random.nextDouble() < CONTROL_GOOD;
        boolean good = goodUntreated || (treated && random.nextDouble() < TURNED_GOOD);
        double meanDays = good ? GOOD_DELAY_DAYS : BAD_DELAY_DAYS;
        long delayMillis = (long) (-Math.log(1 - random.nextDouble()) * meanDays * 86_400_000L);
        due.add(new Reported(clock.plusMillis(delayMillis), clock, unit, treated, good ? 1 : 0));
        o.put("kind", "exposure");
        o.put("study", study);
        o.put("unit", unit);
        o.put("treated", treated);
        o.put("time", clock.toString());
        KeyedLine exposure = line(unit, o);
        clock = clock.plus(ENROLMENT_GAP);
        return exposure;
    }

    private static KeyedLine line(String key, ObjectNode o) {
        try {
            return new KeyedLine(key, MAPPER.writeValueAsString(o));
        } catch (JsonProcessingException e) {
            throw new IllegalStateException("cannot happen for a tree of strings and numbers", e);
        }
    }
}
