package dev.bracket.stream.transaction;

import dev.bracket.stream.ingest.LateKey;
import dev.bracket.stream.ingest.RejectReason;
import dev.bracket.stream.ingest.StudyEventCounts;
import dev.bracket.config.StudyConfig;

import java.util.Arrays;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

/**
 * The event counts of one aggregation member's open transaction: accepted per input topic,
 * rejected per topic and reason, late per study and window, and per study accepted, rejected
 * and out of range (plus rejected records naming no study). They reach the meters and the
 * listener only when the transaction commits ({@link #publish}); an aborted transaction's
 * counts are dropped ({@link #discard}), and its records, read again, are counted then. So every
 * count users see counts each input record once, as committed. One writer, no locking.
 */
final class CommittedCounts {

    private final List<StudyConfig> studies;
    private final Map<String, long[]> accepted = new HashMap<>();
    /** Keyed by topic and reason. */
    private final Map<TopicReason, long[]> rejected = new HashMap<>();
    private final Map<LateKey, long[]> late = new HashMap<>();
    /** Per study (in configuration order, as the parsers number them): accepted, rejected, out of range. */
    private final long[][] perStudy;
    /** Rejected records without a readable study. */
    private long unattributed;

    private record TopicReason(String topic, RejectReason reason) {
    }

    CommittedCounts(List<StudyConfig> studies) {
        this.studies = studies;
        this.perStudy = new long[studies.size()][3];
    }

    void accepted(String topic, int studyIndex) {
        accepted.computeIfAbsent(topic, t -> new long[1])[0]++;
        perStudy[studyIndex][0]++;
    }

    /** @param studyIndex the study the record names, or -1 when none could be read */
    void rejected(String topic, RejectReason reason, int studyIndex) {
        rejected.computeIfAbsent(new TopicReason(topic, reason), k -> new long[1])[0]++;
        if (studyIndex >= 0) {
            perStudy[studyIndex][1]++;
            perStudy[studyIndex][2] += reason == RejectReason.OUT_OF_RANGE ? 1 : 0;
        } else {
            unattributed++;
        }
    }

    void late(String study, String window) {
        late.computeIfAbsent(new LateKey(study, window), k -> new long[1])[0]++;
    }

    /** After a commit: adds the counts to the meters, tells the listener, and starts again from zero. */
    void publish(StreamMetrics metrics, StudyEventCounts listener) {
        accepted.forEach((topic, n) -> metrics.accepted(topic, n[0]));
        rejected.forEach((k, n) -> metrics.rejected(k.topic(), k.reason(), n[0]));
        late.forEach((k, n) -> metrics.late(k.study(), k.window(), n[0]));
        long[][] studyCounts = new long[perStudy.length][];
        for (int i = 0; i < perStudy.length; i++) {
            studyCounts[i] = perStudy[i].clone();
        }
        long none = unattributed;
        discard(); // before the listener runs: a listener that throws must not see these counts again
        for (int i = 0; i < studyCounts.length; i++) {
            long[] c = studyCounts[i];
            if (c[0] + c[1] > 0) {
                listener.counted(studies.get(i).id(), c[0], c[1], c[2]);
            }
        }
        if (none > 0) {
            listener.unattributed(none);
        }
    }

    /** After an abort: forgets the counts (the records are read and counted again). */
    void discard() {
        accepted.clear();
        rejected.clear();
        late.clear();
        for (long[] c : perStudy) {
            Arrays.fill(c, 0);
        }
        unattributed = 0;
    }
}
