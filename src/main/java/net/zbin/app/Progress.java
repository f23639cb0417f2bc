package net.zbin.app;

import java.io.PrintWriter;
import java.util.Locale;
import java.util.function.Consumer;
import net.zbin.app.report.Shown;
import net.zbin.sim.HandlerSim;

/**
 * Live progress: on a terminal one line redrawn four times a second; into a pipe or file a plain line
 * every five seconds, so no carriage returns end up in logs.
 */
final class Progress {
    private Progress() {}

    static Consumer<HandlerSim.Progress> line(PrintWriter out) {
        boolean terminal = System.console() != null;
        long every = terminal ? 250_000_000L : 5_000_000_000L;
        long[] last = {System.nanoTime()};
        return p -> {
            long now = System.nanoTime();
            if (now - last[0] < every) return;
            last[0] = now;
            String text = String.format(Locale.ROOT, "  parts %6d   UPH %8.0f   yield %8s   last bin %3d (%s)", p.parts(), p.uph(),
                    Shown.of("%.2f %%", p.yieldPct()), p.lastBin(), p.lastGrade());
            if (terminal) out.print("\r" + text + "      ");
            else out.println(text);
            out.flush();
        };
    }

    /** Ends a redrawn line. */
    static void end(PrintWriter out) {
        if (System.console() != null) out.println();
    }
}
