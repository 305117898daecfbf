package dev.bracket.alerts.delivery;

import dev.bracket.alerts.AlertTransition;
import dev.bracket.alerts.TransitionKind;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

import java.util.Locale;

/**
 * Writes one readable line per transition to the log (logger {@code dev.bracket.alerts}):
 * firing at WARN, resolved at INFO.
 */
public final class LogAlertSink implements AlertSink {

    private static final Logger LOG = LoggerFactory.getLogger("dev.bracket.alerts");

    @Override
    public String name() {
        return "log";
    }

    @Override
    public void accept(AlertTransition t) {
        if (t.kind() == TransitionKind.FIRING) {
            LOG.warn(line(t));
        } else {
            LOG.info(line(t));
        }
    }

    /**
     * The line, e.g. {@code alert FIRING rollout/mts-negative/cumulative/sign-identified #1: sign of
     * the effect identified: positive (…) [id …] …}, ending with the cautions in short when the
     * alert is about an interval; per-study alerts (a stalled stream, data quality) rest on no
     * assumption and carry none.
     */
    static String line(AlertTransition t) {
        String since = t.kind() == TransitionKind.RESOLVED ? "; firing since " + t.firingSince() : "";
        String cautions = t.key().rule().perRow() ? " — only as credible as its assumptions;"
                + " not clinical or operational advice; defer to local regulation and licensed practice" : "";
        return "alert " + t.kind().id().toUpperCase(Locale.ROOT) + " " + t.key() + " #" + t.sequence() + ": "
                + t.summary() + since + " [id " + t.transitionId() + "]" + cautions;
    }
}
