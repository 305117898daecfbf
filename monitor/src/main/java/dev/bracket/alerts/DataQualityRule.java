package dev.bracket.alerts;

import java.time.Duration;

/**
 * Fires when the share of rejected records among all records of a study within the last
 * {@code period} exceeds {@code maxShare}. Counted: the study's accepted events, its rejected
 * events of any reason (wrong type, missing field, outcome outside the declared range, …), and
 * the records no study could be read from (unparseable lines and the like), which count against
 * every study because they may be any study's.
 *
 * @param maxShare    the largest acceptable rejected share, in [0, 1)
 * @param period      how far back events are counted
 * @param minEvents   fewer events than this in the period judge nothing (a single bad event out of
 *                    three is not a data-quality finding)
 * @param clearShareBelow a firing alert resolves at once when the share falls to {@code maxShare - clearShareBelow}
 *                    or below; 0 disables the margin
 */
public record DataQualityRule(double maxShare, Duration period, long minEvents, double clearShareBelow) {

    public DataQualityRule {
        if (!(maxShare >= 0 && maxShare < 1)) {
            throw new IllegalArgumentException("data-quality max-rejected-share must lie in [0, 1), was " + maxShare);
        }
        if (period == null || period.isNegative() || period.isZero()) {
            throw new IllegalArgumentException("data-quality period must be a positive duration, was " + period);
        }
        if (minEvents < 1) {
            throw new IllegalArgumentException("data-quality min-events must be at least 1, was " + minEvents);
        }
        if (!(clearShareBelow >= 0 && clearShareBelow <= maxShare)) {
            throw new IllegalArgumentException("data-quality clear-share-below must lie in [0, max-rejected-share], was " + clearShareBelow);
        }
    }

    public Verdict judge(Evidence.OfQuality counts) {
        long total = counts.total();
        String seen = (counts.rejected() + counts.unattributed()) + " of " + total + " records rejected in the last "
                + AlertText.duration(period) + " (" + counts.outOfRange() + " out of range, " + counts.unattributed()
                + " without a readable study), share " + AlertText.num(counts.rejectedShare())
                + ", limit " + AlertText.num(maxShare);
        if (total < minEvents) {
            return Verdict.unknown(seen + "; fewer than " + minEvents + " events");
        }
        if (counts.rejectedShare() > maxShare) {
            return Verdict.met("", seen);
        }
        if (clearShareBelow > 0 && counts.rejectedShare() <= maxShare - clearShareBelow) {
            return Verdict.clear(seen + ", below the limit by clear-share-below " + AlertText.num(clearShareBelow));
        }
        return Verdict.unmet(seen);
    }
}
