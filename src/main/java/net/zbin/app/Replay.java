package net.zbin.app;

import net.zbin.core.Grader;
import net.zbin.core.Grading;
import net.zbin.core.Impedance;
import net.zbin.core.Reading;
import net.zbin.core.Recipe;
import net.zbin.io.ReplayRow;

/**
 * Grades one replay row as the daemon graded it live. A record-log row carries compensated R/X
 * and the reason of an unclean reading; a row without R/X (nothing was measured, e.g. a meter
 * timeout or overload) is re-created from its reason.
 */
final class Replay {
    private Replay() {}

    static Grading grade(Recipe recipe, ReplayRow row) {
        String reason = row.reason();
        boolean hasZ = Double.isFinite(row.rOhm()) && Double.isFinite(row.xOhm());
        if (!hasZ && reason != null) return Grader.byReason(recipe, reason, row.attempt());
        if (!hasZ) return Grader.grade(recipe, new Reading(row.freqHz(), row.rOhm(), row.xOhm()), null, row.attempt());
        Impedance z = new Impedance(row.freqHz(), row.rOhm(), row.xOhm());
        double rawR = Double.isFinite(row.rawROhm()) ? row.rawROhm() : row.rOhm();
        double rawX = Double.isFinite(row.rawXOhm()) ? row.rawXOhm() : row.xOhm();
        return Grader.gradeCorrected(recipe, z, new Reading(row.freqHz(), rawR, rawX), row.comp(), row.attempt());
    }
}
