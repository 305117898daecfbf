package dev.bracket.alerts;

import dev.bracket.bands.ConfidenceBand;
import dev.bracket.bounds.BoundStatus;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.Collection;
import java.util.Comparator;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.Set;
import java.util.TreeMap;

/**
 * Judges every configured rule and keeps one {@link AlertState} per alert key. Per-row rules are
 * judged on each bound update ({@link #evaluate}); per-study rules on a clock ({@link #tick}),
 * which is injected so tests control time. Pure logic: the transitions it returns go to the sinks
 * through {@link AlertDispatcher}. Thread-safe (one lock; alert traffic is tiny).
 */
public final class AlertEvaluator {

    private static final Logger LOG = LoggerFactory.getLogger(AlertEvaluator.class);

    /** Counting period for studies without a data-quality rule; only bounds memory. */
    private static final Duration IDLE_PERIOD = Duration.ofMinutes(1);

    private final Map<String, StudyAlertConfig> studies;
    private final Clock clock;
    private final Instant upSince;
    private final Map<AlertKey, AlertState> states = new HashMap<>();
    private final Map<String, EventCounts> traffic = new HashMap<>();

    /**
     * @param studies each configured study's alert settings, by study id
     * @param clock   the time source for stall and data-quality judgements
     */
    public AlertEvaluator(Map<String, StudyAlertConfig> studies, Clock clock) {
        this.studies = Map.copyOf(studies);
        this.clock = clock;
        this.upSince = clock.instant();
        this.studies.forEach((study, config) -> traffic.put(study,
                new EventCounts(config.quality().map(DataQualityRule::period).orElse(IDLE_PERIOD))));
    }

    /**
     * Judges the per-row rules of the snapshot's study. Nothing is judged (and no state
     * changes) while either arm has fewer than the study's min-per-arm units, the interval
     * lacks data, or the configured band is missing.
     *
     * @return the transitions caused, in order
     */
    public synchronized List<AlertTransition> evaluate(BoundSnapshot snapshot) {
        StudyAlertConfig config = studies.get(snapshot.study());
        Optional<ConfidenceBand> band = config == null ? Optional.empty() : snapshot.band(config.band());
        if (band.isEmpty() || band.get().status() == BoundStatus.INSUFFICIENT_DATA
                || snapshot.smallerArm() < config.minPerArm()
                || snapshot.interval().status() == BoundStatus.INSUFFICIENT_DATA) {
            return List.of();
        }
        List<AlertTransition> out = new ArrayList<>();
        for (RowRule rule : config.rowRules()) {
            AlertKey key = AlertKey.perRow(snapshot.study(), snapshot.assumptions(), snapshot.window(), rule.rule());
            Verdict verdict = rule.judge(snapshot.interval(), band.get());
            Evidence evidence = new Evidence.OfBand(snapshot.arms(), snapshot.interval(), band.get(), rule.limits());
            apply(key, verdict, evidence, snapshot.at(), config.clearAfter(), snapshot.assumptions().meaning(), out);
        }
        return out;
    }

    /**
     * Counts events of a study as they arrive (at the clock's time): accepted ones, rejected ones,
     * and of the rejected those whose outcome lay outside the declared range. Events of studies
     * without alert settings are ignored.
     */
    public synchronized void recordEvents(String study, long accepted, long rejected, long outOfRange) {
        EventCounts counts = traffic.get(study);
        if (counts != null) {
            counts.record(clock.instant(), accepted, rejected, outOfRange);
        }
    }

    /**
     * Counts rejected records whose study could not be read against {@code study}'s data quality
     * (at the clock's time): they may be any study's, so the caller tells every study it judges.
     */
    public synchronized void recordUnattributed(String study, long rejected) {
        EventCounts counts = traffic.get(study);
        if (counts != null) {
            counts.recordUnattributed(clock.instant(), rejected);
        }
    }

    /**
     * Takes over when each study's last event arrived before a restart, so that a stall is judged
     * from it rather than from this start. Call before any event is recorded.
     */
    public synchronized void restoreLastEvents(Map<String, Instant> lastEvents) {
        lastEvents.forEach((study, at) -> {
            EventCounts counts = traffic.get(study);
            if (counts != null) {
                counts.restoreLastEvent(at);
            }
        });
    }

    /**
     * When each configured study's last event arrived; this evaluator's start when none has and
     * none was restored (so that after a restart a study that never sent counts as silent since
     * the first start).
     */
    public synchronized Map<String, Instant> lastEvents() {
        Map<String, Instant> out = new TreeMap<>();
        traffic.forEach((study, counts) -> out.put(study, counts.lastEventAt().orElse(upSince)));
        return out;
    }

    /** The time on the evaluator's clock. */
    public Instant now() {
        return clock.instant();
    }

    /** Judges the per-study rules (stream stalled, data quality) at the clock's time. */
    public List<AlertTransition> tick() {
        return tick(studies.keySet());
    }

    /** Judges the per-study rules of the given studies only (those this instance owns). */
    public synchronized List<AlertTransition> tick(Set<String> judged) {
        Instant now = clock.instant();
        List<AlertTransition> out = new ArrayList<>();
        studies.entrySet().stream().filter(e -> judged.contains(e.getKey())).sorted(Map.Entry.comparingByKey()).forEach(e -> {
            String study = e.getKey();
            StudyAlertConfig config = e.getValue();
            EventCounts counts = traffic.get(study);
            config.stalled().ifPresent(rule -> apply(AlertKey.perStudy(study, AlertRule.STREAM_STALLED),
                    rule.judge(counts.lastEventAt(), upSince, now), rule.evidence(counts.lastEventAt(), upSince, now), now,
                    config.clearAfter(), "", out));
            config.quality().ifPresent(rule -> {
                Evidence.OfQuality q = counts.within(now, rule.maxShare());
                apply(AlertKey.perStudy(study, AlertRule.DATA_QUALITY), rule.judge(q), q, now, config.clearAfter(), "", out);
            });
        });
        return out;
    }

    /**
     * Takes over states recorded before a restart. For a key known both here and in
     * {@code restored}, the state with more transitions wins, so restoring twice is harmless.
     */
    public synchronized void restore(Collection<AlertState> restored) {
        for (AlertState s : restored) {
            if (!configured(s.key())) {
                if (s.firing()) {
                    LOG.warn("alert {} was firing before the restart, but its study or rule is no longer configured:"
                            + " it will not be judged again (its last document stays in the alerts topic)", s.key());
                }
                continue;
            }
            states.merge(s.key(), s, (mine, theirs) -> theirs.sequence() > mine.sequence() ? theirs : mine);
        }
    }

    /** The configured studies. */
    public Set<String> studies() {
        return studies.keySet();
    }

    /**
     * Drops the states and traffic of {@code gone}: another instance judges them now (and a later
     * owner restores the states from the alerts topic and the last event times from the ledger,
     * {@link #restoreLastEvents}).
     */
    public synchronized void forget(Set<String> gone) {
        states.keySet().removeIf(k -> gone.contains(k.study()));
        gone.forEach(study -> traffic.computeIfPresent(study, (s, old) -> new EventCounts(old.period())));
    }

    private boolean configured(AlertKey key) {
        StudyAlertConfig c = studies.get(key.study());
        if (c == null) {
            return false;
        }
        return switch (key.rule()) {
            case STREAM_STALLED -> c.stalled().isPresent();
            case DATA_QUALITY -> c.quality().isPresent();
            default -> c.rowRules().stream().anyMatch(r -> r.rule() == key.rule());
        };
    }

    /** The state of one key (the initial state if it never fired). */
    public synchronized AlertState state(AlertKey key) {
        return states.getOrDefault(key, AlertState.initial(key));
    }

    /** Alerts firing now, by key text. */
    public synchronized List<AlertState> firing() {
        return states.values().stream().filter(AlertState::firing)
                .sorted(Comparator.comparing(s -> s.key().toString())).toList();
    }

    private void apply(AlertKey key, Verdict verdict, Evidence evidence, Instant at, int clearAfter, String meaning,
                       List<AlertTransition> out) {
        AlertState.Step step = state(key).next(verdict, evidence, at, clearAfter, meaning);
        if (step.state().sequence() == 0) {
            states.remove(key); // keys that never fired keep no state: memory grows with alerts, not with rows
        } else {
            states.put(key, step.state());
        }
        out.addAll(step.transitions());
    }
}
