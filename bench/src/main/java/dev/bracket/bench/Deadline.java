package dev.bracket.bench;

import java.time.Duration;
import java.util.concurrent.TimeUnit;

/** A time limit for a harness's wait, so that a stuck run stops with a message instead of hanging. */
final class Deadline {

    /** A condition whose check may talk to the broker. */
    interface Condition {
        boolean holds() throws Exception;
    }

    private final String what;
    private final Duration limit;
    private final long end;

    private Deadline(String what, Duration limit) {
        this.what = what;
        this.limit = limit;
        this.end = System.nanoTime() + limit.toNanos();
    }

    /** A deadline {@code limit} from now for reaching {@code what}. */
    static Deadline in(Duration limit, String what) {
        return new Deadline(what, limit);
    }

    /** Waits, checking every millisecond (timings end here), until the condition holds or {@code limit} has passed. */
    static void await(Duration limit, String what, Condition condition) throws Exception {
        Deadline deadline = in(limit, what);
        while (!condition.holds()) {
            deadline.check();
            TimeUnit.MILLISECONDS.sleep(1);
        }
    }

    /** Throws once the deadline has passed. */
    void check() {
        if (System.nanoTime() > end) {
            throw new IllegalStateException("gave up after " + limit.toSeconds() + " s waiting for " + what);
        }
    }
}
