package dev.bracket.duration;

import java.time.Duration;
import java.util.Locale;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

/**
 * The one grammar of durations, in the configuration and on the command line: a number and a
 * unit ({@code 500ms}, {@code 30s}, {@code 1.5m}, {@code 1h}, {@code 7d}) or ISO-8601
 * ({@code PT1H}).
 */
public final class DurationText {

    /** What a duration looks like, for error messages. */
    public static final String EXAMPLES = "500ms, 30s, 5m, 1h, 7d or PT1H";

    private static final Pattern FORM = Pattern.compile("(\\d+(?:\\.\\d+)?)\\s*(ms|s|m|h|d)");

    private DurationText() {
    }

    /** Parses a duration; a text in neither form throws, naming the forms. */
    public static Duration parse(String text) {
        String s = text == null ? "" : text.trim().toLowerCase(Locale.ROOT);
        Matcher m = FORM.matcher(s);
        try {
            if (m.matches()) {
                double v = Double.parseDouble(m.group(1));
                return Duration.ofMillis(Math.round(v * switch (m.group(2)) {
                    case "ms" -> 1L;
                    case "s" -> 1_000L;
                    case "m" -> 60_000L;
                    case "h" -> 3_600_000L;
                    default -> 86_400_000L;
                }));
            }
            return Duration.parse(s.toUpperCase(Locale.ROOT));
        } catch (RuntimeException e) {
            throw new IllegalArgumentException("must be a duration like " + EXAMPLES + ", was '" + text + "'");
        }
    }

    /** Picocli converter, so a bad value is reported as a usage error naming the option. */
    public static final class Converter implements picocli.CommandLine.ITypeConverter<Duration> {
        @Override
        public Duration convert(String value) {
            try {
                return parse(value);
            } catch (IllegalArgumentException e) {
                throw new picocli.CommandLine.TypeConversionException(e.getMessage());
            }
        }
    }
}
