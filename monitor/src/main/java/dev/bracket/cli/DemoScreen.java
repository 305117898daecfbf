package dev.bracket.cli;

import dev.bracket.alerts.AlertState;
import dev.bracket.report.Cautions;
import dev.bracket.bands.BandMethod;
import dev.bracket.bands.ConfidenceBand;
import dev.bracket.bounds.IdentifiedInterval;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.demo.TrueEffects;
import dev.bracket.report.BoundRow;
import dev.bracket.report.store.PublishedReport;

import java.time.Duration;
import java.time.ZoneOffset;
import java.time.format.DateTimeFormatter;
import java.util.Comparator;
import java.util.List;
import java.util.Locale;
import java.util.Optional;

/**
 * The text the demo redraws every refresh: the newest cumulative report of the demo study, each
 * assumption set's interval beside the true effect that only a simulation knows, the counts, and
 * where the page is. A pure function of its inputs, so it can be checked without a terminal.
 */
final class DemoScreen {

    private static final DateTimeFormatter CLOCK = DateTimeFormatter.ofPattern("HH:mm:ss 'UTC'").withZone(ZoneOffset.UTC);


    /**
     * What the screen shows.
     *
     * @param study     the demo study's identifier
     * @param scenario  one paragraph describing the simulation
     * @param truth     the simulation's true effect and unobservable means
     * @param sent      events the producer has sent so far
     * @param elapsed   time since the demo started sending
     * @param duration  planned length of the demo, or null when it runs until Ctrl-C
     * @param address   where the page and API are served
     * @param report    the newest report of the study's cumulative window, if one exists yet
     * @param firing    the alerts firing now
     */
    record State(String study, String scenario, TrueEffects truth, long sent, Duration elapsed, Duration duration,
                 String address, Optional<PublishedReport> report, List<AlertState> firing) {
    }

    private DemoScreen() {
    }

    static String render(State s) {
        StringBuilder out = new StringBuilder();
        out.append(String.format(Locale.ROOT, "Bracket demo - study %s - %s - page and JSON: %s%n",
                s.study(), progress(s.elapsed(), s.duration()), s.address()));
        out.append(wrap(s.scenario(), 100)).append('\n');
        out.append(String.format(Locale.ROOT, "True ATE %+.4f (only a simulation knows it; real data never show it).%n",
                s.truth().ate()));
        if (s.report().isEmpty()) {
            out.append(String.format(Locale.ROOT, "%nEvents sent: %,d. Waiting for the first report...%n", s.sent()));
            appendCautions(out);
            return out.toString();
        }
        PublishedReport published = s.report().get();
        ObservedArms arms = published.report().pooled();
        out.append(String.format(Locale.ROOT, "%nEvents sent %,d; in the report %,d units: %,d with the setting, %,d without"
                        + " (report of %s).%n",
                s.sent(), arms.total(), arms.treated().count(), arms.control().count(), CLOCK.format(published.computedAt())));
        if (!arms.hasEmptyArm()) {
            double naive = arms.treated().mean() - arms.control().mean();
            out.append(String.format(Locale.ROOT, "Naive difference of means %+.4f; it differs from the true ATE by %+.4f"
                    + " because of who got the setting.%n", naive, naive - s.truth().ate()));
        }
        out.append('\n');
        List<BoundRow> rows = published.report().rows();
        int width = Math.max("assumptions".length(), rows.stream().mapToInt(r -> r.assumptions().toString().length()).max().orElse(0));
        String bandHeader = rows.stream().flatMap(r -> anytimeBand(r).stream()).findFirst()
                .map(b -> String.format(Locale.ROOT, "%.0f%% anytime band", 100 * b.level())).orElse("");
        // the band column is left out while the reports carry no bands
        String format = "%-" + width + "s  %9s  %9s  %8s  %-27s  " + (bandHeader.isEmpty() ? "%s" : "%-19s  ") + "%s%n";
        out.append(String.format(Locale.ROOT, format, "assumptions", "lower", "upper", "width", "sign of effect",
                bandHeader, "true ATE inside?"));
        for (BoundRow row : rows) {
            IdentifiedInterval iv = row.interval();
            String band = anytimeBand(row).map(DemoScreen::bandText).orElse("");
            if (iv.isBounded()) {
                boolean covers = iv.lower() <= s.truth().ate() && s.truth().ate() <= iv.upper();
                out.append(String.format(Locale.ROOT, format, row.assumptions(), signed(iv.lower()), signed(iv.upper()),
                        String.format(Locale.ROOT, "%.4f", iv.width()), signText(row), band,
                        covers ? "yes" : "NO: an assumption is false here"));
            } else {
                out.append(String.format(Locale.ROOT, format, row.assumptions(), "-", "-", "-", iv.status().id(), band, "-"));
            }
        }
        out.append('\n');
        appendAlerts(out, s.firing());
        appendCautions(out);
        return out.toString();
    }

    /** One line per firing alert, oldest first, so what the data now say stands out from the table. */
    private static void appendAlerts(StringBuilder out, List<AlertState> firing) {
        if (firing.isEmpty()) {
            out.append("Alerts: none firing.\n\n");
            return;
        }
        out.append("Alerts firing now (details at /api/alerts):\n");
        firing.stream().sorted(Comparator.comparing(AlertState::since)).forEach(a -> out.append(String.format(Locale.ROOT,
                "  since %s  %-16s %-9s %s%n", CLOCK.format(a.since()), a.key().rule().id(),
                a.variant(), a.key().assumptions())));
        out.append('\n');
    }

    private static Optional<ConfidenceBand> anytimeBand(BoundRow row) {
        return row.bands().stream().filter(b -> b.method() == BandMethod.ANYTIME).findFirst();
    }

    private static String bandText(ConfidenceBand b) {
        return b.isBounded() ? "[" + signed(b.lower()) + ", " + signed(b.upper()) + "]" : b.status().id();
    }

    private static String signed(double v) {
        return String.format(Locale.ROOT, "%+.4f", v);
    }

    private static String signText(BoundRow row) {
        return switch (row.sign()) {
            case "positive" -> "positive (helps)";
            case "negative" -> "negative (harms)";
            default -> "not identified (contains 0)";
        };
    }

    private static void appendCautions(StringBuilder out) {
        Cautions.ALL.forEach(line -> out.append(line).append('\n'));
    }

    private static String progress(Duration elapsed, Duration duration) {
        long e = elapsed.toSeconds();
        return duration == null
                ? String.format(Locale.ROOT, "%d s (Ctrl-C stops)", e)
                : String.format(Locale.ROOT, "%d s of %d s", Math.min(e, duration.toSeconds()), duration.toSeconds());
    }

    /** Breaks a paragraph at spaces so no line exceeds {@code width} characters. */
    static String wrap(String text, int width) {
        StringBuilder out = new StringBuilder();
        int lineStart = 0;
        for (String word : text.split(" ")) {
            if (out.length() - lineStart + word.length() + 1 > width && out.length() > lineStart) {
                out.append('\n');
                lineStart = out.length();
            } else if (out.length() > lineStart) {
                out.append(' ');
            }
            out.append(word);
        }
        return out.toString();
    }
}
