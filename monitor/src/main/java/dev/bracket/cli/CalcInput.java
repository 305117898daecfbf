package dev.bracket.cli;

import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.OutcomeKind;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.bounds.StudyCells;

/** Checks of one arm's summary statistics against the declared outcome range. */
final class CalcInput {

    private CalcInput() {
    }

    /**
     * The cells given to {@code calc}, and whether every arm with two or more units came with a
     * standard deviation (otherwise the fixed-horizon band bounds the variances by the range).
     */
    record Cells(StudyCells cells, boolean everySdGiven) {
    }

    /**
     * Validates and builds an arm from its summary. The standard deviation of values in [a, b]
     * with mean m cannot exceed {@code sqrt((m-a)(b-m) * n/(n-1))} (Bhatia &amp; Davis 2000,
     * Amer. Math. Monthly 107(4), with the n/(n-1) factor of the sample SD); a larger one means the
     * summary and the range disagree.
     *
     * <p>{@code pending} units entered the arm but have no outcome yet; they count as exposures
     * ({@code n + pending}) so the bounds treat their outcomes as unknown within the range. With
     * no pending units no exposures are recorded, exactly as before pending counts existed.
     *
     * @param where prefix naming the flag or file position, e.g. {@code "--treated-"}
     */
    static ArmStatistics arm(long n, long pending, double mean, double sd, OutcomeRange range, String where) {
        if (n < 0) {
            throw new InputError(where + "n must be >= 0, was " + n);
        }
        if (pending < 0) {
            throw new InputError(where + "pending must be >= 0 (units still waiting for an outcome), was " + pending);
        }
        long exposed = pending == 0 ? 0 : n + pending;
        if (n == 0) {
            return ArmStatistics.empty().withExposures(exposed);
        }
        if (!Double.isFinite(mean) || !range.contains(mean)) {
            throw new InputError(where + "mean must lie in the outcome range [" + fmt(range.min()) + ", "
                    + fmt(range.max()) + "], was " + fmt(mean));
        }
        if (!(sd >= 0) || !Double.isFinite(sd)) {
            throw new InputError(where + "sd must be a finite number >= 0, was " + fmt(sd));
        }
        double limit = n > 1 ? Math.sqrt((mean - range.min()) * (range.max() - mean) * n / (n - 1)) : 0.0;
        if (sd > limit * (1 + 1e-9) + 1e-12) {
            throw new InputError(where + "sd " + fmt(sd) + " is impossible for " + n + " outcomes in ["
                    + fmt(range.min()) + ", " + fmt(range.max()) + "] with mean " + fmt(mean)
                    + " (at most " + fmt(limit) + "); check the summary and the range");
        }
        return ArmStatistics.ofSummary(n, mean, sd).withExposures(exposed);
    }

    /**
     * The arm's standard deviation when known: the one given, or for binary outcomes the one the
     * mean implies, {@code (b - a) sqrt(u (1 - u) n / (n - 1))} with {@code u = (mean - a) / (b - a)}
     * the share at b; null when neither (then the fixed-horizon band bounds it by the range).
     */
    static Double knownSd(Double given, long n, double mean, OutcomeRange range) {
        if (given != null || range.kind() != OutcomeKind.BINARY || n < 2) {
            return given;
        }
        double u = Math.min(1, Math.max(0, range.toUnit(mean)));
        return range.width() * Math.sqrt(u * (1 - u) * n / (n - 1));
    }

    static String fmt(double v) {
        return v == Math.rint(v) && Math.abs(v) < 1e15 ? String.valueOf((long) v) : String.valueOf(v);
    }
}
