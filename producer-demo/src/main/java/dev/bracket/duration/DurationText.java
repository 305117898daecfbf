package dev.bracket.duration;

import java.time.Duration;
import java.util.Locale;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

/** Durations as people type them on a command line: {@code 90s}, {@code 5m}, {@code 2h}, {@code 500ms}, or plain seconds. */
public final class DurationText {

    private static final Pattern FORM = Pattern.compile("(\\d+)(ms|s|m|h)?");

    private DurationText() {
    }

    public static Duration parse(String text) {
        Matcher m = FORM.matcher(text == null ? "" : text.trim().toLowerCase(Locale.ROOT));
        if (!m.matches()) {
            throw new IllegalArgumentException("'" + text + "' is not a duration; write e.g. 90s, 5m, 2h or 500ms");
        }
        long n = Long.parseLong(m.group(1));
        String unit = m.group(2) == null ? "s" : m.group(2);
        return switch (unit) {
            case "ms" -> Duration.ofMillis(n);
            case "s" -> Duration.ofSeconds(n);
            case "m" -> Duration.ofMinutes(n);
            default -> Duration.ofHours(n);
        };
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
