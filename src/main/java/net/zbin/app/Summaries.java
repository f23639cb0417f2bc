package net.zbin.app;

import java.io.PrintWriter;
import java.util.Locale;
import net.zbin.sim.HandlerSim;

/** The handler's end-of-lot table: bins, reasons, timing and answer quality. */
final class Summaries {
    private Summaries() {}

    static void print(PrintWriter out, HandlerSim.Summary s) {
        out.printf(Locale.ROOT, "%d parts, %d triggers, %d decisions; yield %.2f %%%n", s.parts(), s.triggers(), s.decisions(), s.yieldPct());
        out.printf(Locale.ROOT, "  %4s %10s %8s%n", "bin", "parts", "share");
        s.bins().forEach((bin, n) -> out.printf(Locale.ROOT, "  %4d %10d %7.2f %%%n", bin, n, 100.0 * n / s.parts()));
        out.println("  reasons (final decision per part):");
        s.reasons().forEach((r, n) -> out.printf(Locale.ROOT, "    %-22s %8d%n", r, n));
        out.printf(Locale.ROOT, "  latency p50 %.2f ms, p99 %.2f ms, max %.2f ms (trigger sent → decision received)%n", s.p50Ms(), s.p99Ms(), s.maxMs());
        out.printf(Locale.ROOT, "  late %d, missing %d, duplicate %d, contradictory %d; retests %d; repeats answered %d%n",
                s.late(), s.missing(), s.duplicate(), s.contradictory(), s.retests(), s.repeatsAnswered());
        out.printf(Locale.ROOT, "  fixture checks: %d passed, %d failed%s%n", s.checksPassed(), s.checksFailed(),
                s.offlinePauses() > 0 ? "; fed paused " + s.offlinePauses() + " time(s) while the line was offline" : "");
    }
}
