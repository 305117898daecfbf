package dev.bracket.duration;

import java.math.BigDecimal;
import java.time.Duration;
import java.util.Locale;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

/**
 * The one grammar of durations, in the configuration and on the command line: a number and a
 * unit ({@code 500ms}, {@code 30s}, {@code 1.5m}, {@code 1h}, {@code 7d}) or ISO-8601
 * ({@code PT1H}); in whole milliseconds (the unit of Kafka timestamps and of window panes) and at
 * most {@link #MAX}: longer spans mean nothing for a stream and would overflow the time arithmetic
 * done with them (a Duration's nanoseconds overflow after about 292 years). Computed exactly, so
 * no value is silently rounded.
 */
public final class DurationText {

    /** What a duration looks like, for error messages. */
    public static final String EXAMPLES = "500ms, 30s, 5m, 1h, 7d or PT1H";

    /** The longest duration accepted. */
    public static final Duration MAX = Duration.ofDays(36_500);

    private static final Pattern FORM = Pattern.compile("(\\d+(?:\\.\\d+)?)\\s*(ms|s|m|h|d)");

    private DurationText() {
    }

    /** Parses a duration; a text in neither form, too long or finer than a millisecond throws, saying which. */
    public static Duration parse(String text) {
        String s = text == null ? "" : text.trim().toLowerCase(Locale.ROOT);
        Matcher m = FORM.matcher(s);
        BigDecimal millis;
        try {
            millis = m.matches()
                    ? new BigDecimal(m.group(1)).multiply(BigDecimal.valueOf(switch (m.group(2)) {
                        case "ms" -> 1L;
                        case "s" -> 1_000L;
                        case "m" -> 60_000L;
                        case "h" -> 3_600_000L;
                        default -> 86_400_000L;
                    }))
                    : isoMillis(Duration.parse(s.toUpperCase(Locale.ROOT)));
        } catch (RuntimeException e) {
            if (e.getCause() instanceof ArithmeticException) {
                throw tooLong(text);
            }
            throw new IllegalArgumentException("must be a duration like " + EXAMPLES + ", was '" + text + "'");
        }
        if (millis.abs().compareTo(BigDecimal.valueOf(MAX.toMillis())) > 0) {
            throw tooLong(text);
        }
        if (millis.stripTrailingZeros().scale() > 0) {
            throw new IllegalArgumentException("must be a whole number of milliseconds, was '" + text + "'");
        }
        return Duration.ofMillis(millis.longValueExact());
    }

    private static BigDecimal isoMillis(Duration d) {
        return BigDecimal.valueOf(d.getSeconds()).movePointRight(3).add(BigDecimal.valueOf(d.getNano()).movePointLeft(6));
    }

    private static IllegalArgumentException tooLong(String text) {
        return new IllegalArgumentException("is too long: at most " + MAX.toDays() + "d (100 years), was '" + text + "'");
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
