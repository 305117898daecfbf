package dev.bracket.demo;

import java.time.Instant;

/** Where the producer's records come from: the simulation or a file of JSON lines. */
public interface EventFeed {

    /** A record value (one JSON line) and the key it is sent with. */
    record KeyedLine(String key, String value) {
    }

    /** The next record, stamped with {@code now} when the feed makes its own events; null when the feed is exhausted. */
    KeyedLine next(Instant now);
}
