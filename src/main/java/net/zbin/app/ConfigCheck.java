package net.zbin.app;

import java.io.PrintWriter;
import java.nio.file.Path;
import java.util.Locale;
import net.zbin.core.Compensation;
import net.zbin.core.Recipe;
import net.zbin.core.SiValue;
import net.zbin.io.CompensationStore;
import net.zbin.io.LineConfig;
import net.zbin.io.LineConfigLoader;
import net.zbin.io.meter.TransportSpec;

/** Prints a validated line config: what {@code zbin run} would connect to and sort with. */
final class ConfigCheck {
    private ConfigCheck() {}

    static int print(PrintWriter out, Path file) throws Exception {
        LineConfig c = LineConfigLoader.load(file);
        out.printf(Locale.ROOT, "line %s%n", c.line());
        var m = c.mqtt();
        out.printf(Locale.ROOT, "  broker %s as %s (%s), topics %s/%s/…%n", m.broker(), m.clientId(),
                m.username() == null ? "anonymous" : "user " + m.username() + (m.password() != null ? ", password set" : ""),
                m.topicRoot(), c.line());
        TransportSpec t = c.meter().transport();
        out.printf(Locale.ROOT, "  meter profile %s over %s%n", c.meter().name(),
                t.serial() != null ? "serial " + t.serial().port() + " " + t.serial().baud() + " baud" : "tcp " + t.tcpHost() + ":" + t.tcpPort());
        if (!c.meter().confirmReadings())
            out.printf(Locale.ROOT, "  warning: profile %s confirms no reading with a sync query: a stray line that arrives while a reply is awaited "
                    + "cannot be told from the reply (only data already waiting before or behind it is caught)%n", c.meter().name());
        CompensationStore store = CompensationStore.load(c.stateDir());
        java.util.List<String> tooSlow = new java.util.ArrayList<>();
        out.printf(Locale.ROOT, "  recipes in %s:%n", c.recipeDir());
        for (Recipe r : Recipes.all(c.recipeDir(), c.bounds())) {
            Compensation comp = store.forFrequency(r.freqHz());
            out.printf(Locale.ROOT, "    %s %-22s %s at %s, compensation %s%n", r.name().equals(c.activeRecipe()) ? "*" : " ",
                    r.name(), SiValue.format(r.nominal(), r.partType().unit()), SiValue.format(r.freqHz(), "Hz"),
                    comp.isApplied() ? "taken " + comp.takenAt() : "none");
            if (r.needsOpenCompensation() || r.needsShortCompensation())
                out.printf(Locale.ROOT, "        grades nothing without %s compensation: %s, %s is within %.0f× of this fixture's bare %s%n",
                        r.needsOpenCompensation() && r.needsShortCompensation() ? "open and short" : r.needsOpenCompensation() ? "open" : "short",
                        SiValue.format(r.nominal(), r.partType().unit()), SiValue.format(r.idealZOhm(), "ohm"),
                        net.zbin.core.FixtureBounds.MARGIN, r.needsOpenCompensation() ? "open" : "short");
            if (r.unreachable() != null) out.printf(Locale.ROOT, "        warning: no part can pass: %s%n", r.unreachable());
            var timing = c.meter().timing();
            if (timing != null) {
                double ms = timing.planMs(r);
                String slow = ms <= c.deadlineMs() ? null : r.name() + ": its plan takes up to " + SiValue.format(ms / 1000, "s") + " at the meter ("
                        + (r.steps().isEmpty() ? "" : (r.steps().size() + 1) + " steps, ") + (r.remeasure().on() ? "up to " + r.remeasure().maxReadings()
                        + " readings at the value step, " : "") + "profile " + c.meter().name() + "'s timing), beyond the handler's deadline of "
                        + c.deadlineMs() + " ms";
                if (slow != null && r.name().equals(c.activeRecipe())) tooSlow.add(slow); // the line runs it: refused
                else if (slow != null) out.printf(Locale.ROOT, "        warning: %s: the line could not answer in time if switched to it%n", slow);
                else if (!r.steps().isEmpty() || r.remeasure().on())
                    out.printf(Locale.ROOT, "        plan: up to %s at the meter, inside the %d ms deadline%n", SiValue.format(ms / 1000, "s"), c.deadlineMs());
            }
            String outside = c.meter().range() == null ? null : c.meter().range().outside(r.test());
            if (outside != null)
                out.printf(Locale.ROOT, "        warning: %s (profile %s): the meter will refuse this recipe, and the line grades nothing with it%n",
                        outside, c.meter().name());
        }
        out.printf(Locale.ROOT, "  state %s; records %s (flush every %d ms, rotate at %.4g MiB, %s on write failure)%n", c.stateDir(),
                c.records().dir(), c.records().flushMs(), c.records().rotateBytes() / 1048576.0,
                c.records().pauseOnFailure() ? "pause" : "continue");
        out.printf(Locale.ROOT, "  handler deadline %d ms, dashboard every %s%n", c.deadlineMs(), SiValue.format(c.dashboardMs() / 1000.0, "s"));
        if (c.pinCpu() != null) {
            String notHere = net.zbin.app.daemon.CpuPin.problem(c.pinCpu());
            String others = net.zbin.app.daemon.CpuPin.othersThan(c.pinCpu());
            out.printf(Locale.ROOT, "  from ready on, the line's threads run on CPU %d only%s%n", c.pinCpu(),
                    others == null ? "" : "; the JIT compiler's on CPUs " + others);
            if (notHere != null) out.printf(Locale.ROOT, "  warning: pin_cpu: %s: `zbin run` refuses this config on this machine%n", notHere);
            String irq = notHere == null ? net.zbin.app.daemon.CpuPin.interruptWarning(c.pinCpu()) : null;
            if (irq != null) out.printf(Locale.ROOT, "  warning: pin_cpu: %s%n", irq);
        }
        if (c.meter().timing() == null)
            out.printf(Locale.ROOT, "  note: profile %s states no timing: the recipes' plans are not added up against the deadline%n", c.meter().name());
        if (!tooSlow.isEmpty()) throw new UsageException(file + ": " + String.join("; ", tooSlow)
                + " — shorten the plan (fewer steps or readings, a faster speed) or raise handler.deadline_ms");
        out.println("ok: " + file);
        return Main.EXIT_OK;
    }
}
