package dev.bracket.bench;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;

/** Small helpers of the benchmark harnesses. */
final class Stats {

    private Stats() {
    }

    /** "median (min-max)" of {@code xs}, each formatted with {@code format}. */
    static String summary(double[] xs, String format) {
        double[] s = xs.clone();
        Arrays.sort(s);
        double median = s.length % 2 == 1 ? s[s.length / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
        return String.format(Locale.ROOT, format + " (" + format + "-" + format + ")", median, s[0], s[s.length - 1]);
    }

    static void deleteQuietly(Path dir) throws IOException {
        List<Path> paths = new ArrayList<>();
        try (var walk = Files.walk(dir)) {
            walk.forEach(paths::add);
        }
        paths.sort((a, b) -> b.getNameCount() - a.getNameCount());
        for (Path p : paths) {
            Files.deleteIfExists(p);
        }
    }
}
