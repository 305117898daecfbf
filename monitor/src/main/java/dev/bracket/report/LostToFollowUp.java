package dev.bracket.report;

import dev.bracket.bounds.ArmStatistics;

import java.time.Duration;

/**
 * Units still without an outcome longer than the study's follow-up horizon after their exposure:
 * reported as lost to follow-up. Their outcomes stay bounded by the outcome range like any
 * pending outcome; the count only says which pending units are no longer expected.
 *
 * @param treated units of the treated arm lost to follow-up
 * @param control units of the control arm lost to follow-up
 * @param horizon the study's follow-up horizon
 */
public record LostToFollowUp(long treated, long control, Duration horizon) {

    /** The lost units' share of an arm's units ({@code arm} being the treated arm when {@code treatedArm}); NaN for an arm without units. */
    public double share(boolean treatedArm, ArmStatistics arm) {
        return arm.units() == 0 ? Double.NaN : (double) (treatedArm ? treated : control) / arm.units();
    }
}
