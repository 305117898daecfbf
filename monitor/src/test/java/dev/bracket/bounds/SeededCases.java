package dev.bracket.bounds;

import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;
import java.util.function.Consumer;
import java.util.function.Function;

import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Property checks as JUnit parameterized tests. A fixed seed generates the same cases on every
 * run, so a failure reported as "seed S, case N" replays exactly; and a check can be run over
 * the same cases against a deliberately broken engine, to show that it is able to fail.
 */
final class SeededCases {

    private SeededCases() {
    }

    /** {@code count} cases drawn one after another from a generator seeded with {@code seed}. */
    static <T> List<T> generate(long seed, int count, Function<SplittableRandom, T> generator) {
        SplittableRandom random = new SplittableRandom(seed);
        List<T> cases = new ArrayList<>(count);
        for (int i = 0; i < count; i++) {
            cases.add(generator.apply(random));
        }
        return List.copyOf(cases);
    }

    /**
     * Asserts that {@code check} rejects (throws an assertion error for) at least one of the
     * cases, and returns how many it rejected; other exceptions propagate.
     */
    static <T> long assertRejectsSome(List<T> cases, Consumer<T> check, String engine) {
        long rejected = 0;
        for (T c : cases) {
            try {
                check.accept(c);
            } catch (AssertionError expected) {
                rejected++;
            }
        }
        System.out.printf("%s: rejected in %d of %d cases%n", engine, rejected, cases.size());
        assertTrue(rejected > 0, "the check passed every case although the engine is broken (" + engine + ")");
        return rejected;
    }

    /** A share in [0, 1], exactly 0 or 1 one time in eight: the ends of the range are where bounds kink. */
    static double unitWithEnds(SplittableRandom random) {
        return random.nextInt(8) == 0 ? random.nextInt(2) : random.nextDouble();
    }

    /** One of the values, uniformly. */
    @SafeVarargs
    static <T> T oneOf(SplittableRandom random, T... values) {
        return values[random.nextInt(values.length)];
    }
}
