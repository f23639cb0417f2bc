package net.zbin.app;

import java.io.PrintWriter;
import java.util.Locale;
import java.util.function.Consumer;
import net.zbin.sim.HandlerSim;

/** A single live progress line, redrawn at most four times a second. */
final class Progress {
    private Progress() {}

    static Consumer<HandlerSim.Progress> line(PrintWriter out) {
        long[] last = {0};
        return p -> {
            long now = System.nanoTime();
            if (now - last[0] < 250_000_000L) return;
            last[0] = now;
            out.printf(Locale.ROOT, "\r  parts %6d   UPH %8.0f   yield %6.2f %%   last bin %3d (%s)      ", p.parts(), p.uph(),
                    p.yieldPct(), p.lastBin(), p.lastGrade());
            out.flush();
        };
    }
}
