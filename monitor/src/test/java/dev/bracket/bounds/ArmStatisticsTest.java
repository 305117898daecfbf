package dev.bracket.bounds;

import org.apache.commons.math3.stat.descriptive.moment.Mean;
import org.apache.commons.math3.stat.descriptive.moment.Variance;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.util.Random;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** Welford's running statistics against certified values and the two-pass textbook formulas. */
class ArmStatisticsTest {

    /** Two-pass textbook formulas: mean = sum/n, then M2 = sum (x - mean)^2 (Chan, Golub &amp; LeVeque 1983, Amer. Statist. 37(3), the "two-pass algorithm"). */
    private static double[] twoPass(double[] xs) {
        double sum = 0;
        for (double x : xs) {
            sum += x;
        }
        double mean = sum / xs.length;
        double m2 = 0;
        for (double x : xs) {
            m2 += (x - mean) * (x - mean);
        }
        return new double[] {mean, m2};
    }

    /** The NumAcc data sets of NIST StRD (univariate summary statistics): a centre value, then 500 pairs centre -/+ step. */
    private static double[] numAcc(double centre, double step) {
        double[] xs = new double[1001];
        xs[0] = centre;
        for (int i = 0; i < 500; i++) {
            xs[1 + 2 * i] = centre - step;
            xs[2 + 2 * i] = centre + step;
        }
        return xs;
    }

    @Test
    @DisplayName("the textbook example 2,4,4,4,5,5,7,9 has mean 5 and population standard deviation 2")
    void textbookExample() {
        // Worked example of Wikipedia's "Standard deviation" article (that it is Wikipedia's is recalled
        // from memory): mean 5, population SD 2, so M2 = 8 * 2^2 = 32 and sample variance 32/7. The same
        // data with mean 5, population SD 2 and sample variance 32/7 (about 4.571) were found, by search,
        // in the worked example of calculatey.pages.dev/standard-deviation-calculator.
        ArmStatistics s = ArmStatistics.of(2, 4, 4, 4, 5, 5, 7, 9);
        assertEquals(8, s.count());
        assertEquals(5.0, s.mean(), 1e-15);
        assertEquals(32.0, s.m2(), 1e-12);
        assertEquals(32.0 / 7, s.variance(), 1e-12);
        assertEquals(2.0, s.min());
        assertEquals(9.0, s.max());
    }

    @Test
    @DisplayName("NIST StRD NumAcc1: mean 10000002 and sample SD 1")
    void nistNumAcc1() {
        // NIST Statistical Reference Datasets, univariate, NumAcc1: data 10000001, 10000003, 10000002,
        // certified mean 10000002 and SD 1, both exact. Confirmed against NIST's description as reproduced,
        // with its source itl.nist.gov/div898/strd/univ/NumAcc1.html, in the R package
        // github.com/ab9sq/Rqualification, file R/univariateData.R (NIST's own page not seen).
        ArmStatistics s = ArmStatistics.of(10000001, 10000003, 10000002);
        assertEquals(10000002.0, s.mean(), 1e-8);
        assertEquals(1.0, s.sd(), 1e-12);
    }

    @Test
    @DisplayName("NIST StRD NumAcc2-4: sample SD 0.1 around centres 1.2, 1000000.2 and 10000000.2")
    void nistNumAcc2to4() {
        // NIST StRD NumAcc2, NumAcc3, NumAcc4: 1001 values, the centre then 500 pairs centre -/+ 0.1,
        // certified mean = centre and SD 0.1, both exact. Confirmed in the same reproduction of NIST's
        // descriptions (github.com/ab9sq/Rqualification, R/univariateData.R; NIST's own pages not seen).
        // The tolerance on the SD is set by how well the decimal data can be stored in binary at
        // each centre (one ulp of 1e7 is about 2e-9, against a spread of 0.1).
        double[][] cases = {{1.2, 1e-13}, {1000000.2, 1e-8}, {10000000.2, 1e-7}};
        for (double[] c : cases) {
            double[] xs = numAcc(c[0], 0.1);
            ArmStatistics s = ArmStatistics.of(xs);
            assertEquals(1001, s.count());
            assertEquals(c[0], s.mean(), Math.ulp(c[0]) * 4, "mean at centre " + c[0]);
            assertEquals(0.1, s.sd(), 0.1 * c[1], "SD at centre " + c[0]);
        }
    }

    @Test
    @DisplayName("NumAcc4 is hard enough to expose the one-pass sum-of-squares formula that Welford's update avoids")
    void numAcc4DefeatsNaiveFormula() {
        // Same data as above; the naive formula (sum x^2 - n mean^2) loses all digits here
        // (Chan, Golub & LeVeque 1983). This shows the check above can fail.
        double[] xs = numAcc(10000000.2, 0.1);
        double sum = 0;
        double sumSq = 0;
        for (double x : xs) {
            sum += x;
            sumSq += x * x;
        }
        double naiveVariance = (sumSq - sum * sum / xs.length) / (xs.length - 1);
        double naiveSd = Math.sqrt(Math.max(naiveVariance, 0));
        assertTrue(Math.abs(naiveSd - 0.1) > 0.1 * 1e-7, "naive SD " + naiveSd);
        assertEquals(0.1, ArmStatistics.of(xs).sd(), 0.1 * 1e-7);
    }

    @Test
    @DisplayName("Welford agrees with the two-pass formulas and with Commons Math on shifted random data")
    void welfordAgreesWithTwoPass() {
        Random random = new Random(20240611L);
        for (double shift : new double[] {0, 1e3, 1e6}) {
            double[] xs = new double[5000];
            for (int i = 0; i < xs.length; i++) {
                xs[i] = shift + random.nextGaussian();
            }
            ArmStatistics s = ArmStatistics.of(xs);
            double[] reference = twoPass(xs);
            assertEquals(reference[0], s.mean(), 1e-12 * Math.max(1, shift), "mean, shift " + shift);
            assertEquals(reference[1], s.m2(), 1e-9 * reference[1], "M2, shift " + shift);
            // Commons Math 3.6.1 Mean / Variance (bias-corrected, corrected two-pass algorithm).
            assertEquals(new Mean().evaluate(xs), s.mean(), 1e-12 * Math.max(1, shift));
            assertEquals(new Variance().evaluate(xs), s.variance(), 1e-9 * s.variance());
        }
    }

    @Test
    @DisplayName("a published summary (n, mean, sample SD) round-trips through M2 = SD^2 (n-1)")
    void summaryRoundTrip() {
        ArmStatistics s = ArmStatistics.ofSummary(25, 3.5, 1.2);
        assertEquals(1.44 * 24, s.m2(), 1e-12);
        assertEquals(1.2, s.sd(), 1e-15);
        assertTrue(Double.isNaN(s.min()) && Double.isNaN(s.max()), "extremes of a summary are unknown");
        ArmStatistics merged = s.merge(ArmStatistics.ofSummary(25, 3.5, 1.2));
        // Pooling two identical groups: same mean, M2 doubles (Chan et al. with d = 0).
        assertEquals(50, merged.count());
        assertEquals(3.5, merged.mean(), 1e-15);
        assertEquals(2 * 1.44 * 24, merged.m2(), 1e-12);
    }
}
