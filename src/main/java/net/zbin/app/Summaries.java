package net.zbin.app;

import java.io.PrintWriter;
import java.util.Locale;
import net.zbin.app.report.Shown;
import net.zbin.sim.HandlerSim;

/** The handler's end-of-lot table: bins with their grades, reasons, timing and answer quality, every count explained. */
final class Summaries {
    private Summaries() {}

    static void print(PrintWriter out, HandlerSim.Summary s) {
        out.printf(Locale.ROOT, "%d parts finished of %d presented; yield %s (parts passed / parts finished)%n",
                s.finished(), s.parts(), Shown.of("%.2f %%", s.yieldPct()));
        out.printf(Locale.ROOT, "  %d triggers in all: %d part presentations (%d retests among them), %d fixture checks, %d deliberate "
                        + "repeats; %d triggers sent again for want of an answer%n",
                s.triggers(), s.triggers() - (s.checksPassed() + s.checksFailed()) - s.deliberateRepeats(), s.retests(),
                s.checksPassed() + s.checksFailed(), s.deliberateRepeats(), s.resent());
        out.printf(Locale.ROOT, "  %4s  %-8s %10s %8s%n", "bin", "grade", "parts", "share");
        s.bins().forEach((bin, n) -> out.printf(Locale.ROOT, "  %4d  %-8s %10d %7.2f %%%n", bin, s.grades().getOrDefault(bin, ""), n,
                s.finished() == 0 ? 0.0 : 100.0 * n / s.finished()));
        out.println("  reasons (final decision per part):");
        s.reasons().forEach((r, n) -> out.printf(Locale.ROOT, "    %-22s %8d%n", r, n));
        out.printf(Locale.ROOT, "  latency p50 %.2f ms, p99 %.2f ms, max %.2f ms (trigger sent → decision received)%n", s.p50Ms(), s.p99Ms(), s.maxMs());
        out.printf(Locale.ROOT, "  late %d, missing %d, duplicate %d, contradictory %d, stale %d, passed on open or shorted contacts %d; "
                + "answered as repeats %d%n", s.late(), s.missing(), s.duplicate(), s.contradictory(), s.stale(), s.passedOnOpenOrShort(),
                s.repeatsAnswered());
        s.duplicateAnswers().stream().limit(20).forEach(d -> out.println("    answered twice as new: " + d));
        out.printf(Locale.ROOT, "  fixture checks: %d passed, %d failed%s%s%n", s.checksPassed(), s.checksFailed(),
                s.offlinePauses() > 0 ? "; fed paused " + s.offlinePauses() + " time(s) while the line was offline" : "",
                s.seqRestarts() > 0 ? "; seq counter restarted " + s.seqRestarts() + " time(s)" : "");
    }
}
