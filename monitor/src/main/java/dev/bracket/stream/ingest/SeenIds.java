package dev.bracket.stream.ingest;

import dev.bracket.config.DedupConfig;

import java.util.HashMap;
import java.util.Iterator;
import java.util.LinkedHashMap;
import java.util.Map;
import java.util.function.BiConsumer;

/**
 * The event ids one source partition has counted, for rejecting repeats: (study, id) with the
 * event time of the counted event. An id is remembered while that time lies within the horizon
 * of the partition's stream time (largest event time seen), and at most {@code maxIds} ids are
 * held: beyond that the earliest counted is forgotten first, so a repeat of it would count again.
 *
 * <p>Changes since the last commit are kept apart ({@link #forEachChange}) so that the
 * aggregator writes them to the partials topic in the transaction that commits the events: the
 * ids then travel with the counts they guard, and a restart or rebalance restores both from the
 * same point of the stream. One writer, no locking.
 */
public final class SeenIds {

    /** One remembered id. */
    public record Key(String study, String id) {
    }

    private final long horizonMillis;
    private final int maxIds;
    /** In the order counted (the order the records were written, so a restore keeps it). */
    private final LinkedHashMap<Key, Long> seen = new LinkedHashMap<>();
    /** Since the last commit: the event time of a newly counted id, or null for a forgotten one. */
    private final Map<Key, Long> changes = new HashMap<>();

    public SeenIds(DedupConfig settings) {
        this.horizonMillis = settings.horizon().toMillis();
        this.maxIds = settings.maxIds();
    }

    /**
     * Whether {@code (study, id)} is counted for the first time within the horizon; if so it is
     * remembered with {@code time}.
     *
     * @param streamTime the partition's stream time before this event (Long.MIN_VALUE: none yet)
     */
    public boolean firstSighting(String study, String id, long time, long streamTime) {
        Key key = new Key(study, id);
        Long counted = seen.get(key);
        if (counted != null && !expired(counted, Math.max(streamTime, time))) {
            return false;
        }
        if (counted != null) {
            seen.remove(key); // counted again: it moves to the end of the order
        }
        seen.put(key, time);
        changes.put(key, time);
        forgetBeyondLimit();
        return true;
    }

    /**
     * Rejects a usable event with an id as {@link RejectReason#DUPLICATE} when its (study, id) was
     * already counted within the horizon, else remembers it; events without an id pass untouched.
     *
     * @param streamTime the partition's stream time before this event
     */
    public void check(ParsedEvent e, long streamTime) {
        if (e.isUsable() && e.id() != null && !firstSighting(e.study().id(), e.id(), e.time(), streamTime)) {
            String id = e.id().length() <= 80 ? e.id() : e.id().substring(0, 77) + "...";
            e.reject(RejectReason.DUPLICATE, "id '" + id + "' of study '" + e.study().id()
                    + "' was already counted within the dedup-horizon");
        }
    }

    private void forgetBeyondLimit() {
        while (seen.size() > maxIds) {
            Iterator<Map.Entry<Key, Long>> eldest = seen.entrySet().iterator();
            changes.put(eldest.next().getKey(), null);
            eldest.remove();
        }
    }

    /** Forgets the ids whose time lies beyond the horizon before {@code streamTime}. */
    public void forgetExpired(long streamTime) {
        for (Iterator<Map.Entry<Key, Long>> it = seen.entrySet().iterator(); it.hasNext(); ) {
            Map.Entry<Key, Long> e = it.next();
            if (expired(e.getValue(), streamTime)) {
                changes.put(e.getKey(), null);
                it.remove();
            }
        }
    }

    private boolean expired(long counted, long streamTime) {
        return streamTime != Long.MIN_VALUE && streamTime - counted > horizonMillis; // event times are within years 1 to 9999: no overflow
    }

    /** Calls {@code sink} with every id counted (its time) or forgotten (null) since {@link #markClean}. */
    public void forEachChange(BiConsumer<Key, Long> sink) {
        changes.forEach(sink);
    }

    public void markClean() {
        changes.clear();
    }

    /**
     * Puts back the ids read from the partials topic, in the order counted (not marked as
     * changed); beyond a lowered limit the earliest are forgotten, and that is written.
     */
    public void restore(Map<Key, Long> counted) {
        seen.putAll(counted);
        forgetBeyondLimit();
    }

    public int size() {
        return seen.size();
    }
}
