package net.zbin.app;

import java.nio.file.Path;
import java.time.Clock;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.TreeSet;
import java.util.concurrent.Callable;
import net.zbin.core.Impedance;
import net.zbin.core.Recipe;
import net.zbin.core.SiValue;
import net.zbin.core.TestConditions;
import net.zbin.io.CompensationStore;
import net.zbin.io.LineConfig;
import net.zbin.io.LineConfigLoader;
import net.zbin.io.RecipeLoader;
import net.zbin.io.meter.CompensationCapture;
import net.zbin.io.meter.MeterException;
import net.zbin.io.meter.ProfileMeterSession;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;
import picocli.CommandLine.Parameters;

/** {@code zbin compensate}: capture fixture open, short or load data at the test frequencies. */
@Command(name = "compensate", mixinStandardHelpOptions = true, sortOptions = false,
        description = {"Capture fixture compensation through the line's meter and store it in the state folder.",
                "Leave the contacts empty for open, bridge them for short, put the standard on them for load.",
                "Frequencies default to those of every recipe in the recipe folder. A reading that does not look",
                "like the fixture (a part left on the contacts) is refused and nothing is stored."})
public final class CompensateCommand implements Callable<Integer> {
    @Option(names = "--config", required = true, paramLabel = "FILE", description = "line config")
    Path config;
    @Parameters(index = "0", paramLabel = "open|short|load", description = "what is on the contacts")
    String kind;
    @Option(names = "--freq", paramLabel = "HZ", converter = SiConverter.Hertz.class, split = ",", description = "frequencies (repeat or comma-separate)")
    List<Double> freqs;
    @Option(names = "--std-r", paramLabel = "OHM", converter = SiConverter.Ohm.class, description = "load standard's true R (load only)")
    Double stdR;
    @Option(names = "--std-x", paramLabel = "OHM", converter = SiConverter.Ohm.class, defaultValue = "0", description = "load standard's true X (default 0)")
    Double stdX;

    @picocli.CommandLine.Spec
    picocli.CommandLine.Model.CommandSpec spec;

    @Override
    public Integer call() throws Exception {
        CompensationCapture.Kind k = switch (kind) {
            case "open" -> CompensationCapture.Kind.OPEN;
            case "short" -> CompensationCapture.Kind.SHORT;
            case "load" -> CompensationCapture.Kind.LOAD;
            default -> throw new UsageException("what is on the contacts must be open, short or load (was '" + kind + "')");
        };
        if (k == CompensationCapture.Kind.LOAD && stdR == null) throw new UsageException("load needs --std-r (and --std-x if not 0)");
        LineConfig cfg = LineConfigLoader.load(config);
        Recipe active = RecipeLoader.load(cfg.recipeDir().resolve(cfg.activeRecipe() + ".yaml"));
        TreeSet<Double> fs = new TreeSet<>();
        if (freqs != null && !freqs.isEmpty()) fs.addAll(freqs);
        else for (Recipe r : Recipes.all(cfg.recipeDir(), cfg.bounds())) {
            fs.add(r.freqHz());
            for (net.zbin.core.TestStep st : r.steps()) fs.add(st.test().freqHz()); // every step of a plan at its own frequency
        }
        List<TestConditions> conds = new ArrayList<>();
        List<Impedance> std = new ArrayList<>();
        for (double f : fs) {
            try {
                conds.add(new TestConditions(f, active.test().levelV(), active.test().speed(), active.test().averaging()));
                if (stdR != null) std.add(new Impedance(f, stdR, stdX));
            } catch (IllegalArgumentException e) {
                throw new UsageException("--freq " + f + ": " + e.getMessage());
            }
        }
        var out = spec.commandLine().getOut();
        // One writer of the compensation file: the line's lock. While the daemon runs it holds the lock (and the
        // meter); the capture then goes over the command topic, where the daemon stores it and uses it at once.
        net.zbin.io.LineLock lock;
        try {
            lock = net.zbin.io.LineLock.acquire(cfg.stateDir(), cfg.line());
        } catch (net.zbin.io.LineLock.Taken e) {
            spec.commandLine().getErr().println("zbin: " + e.getMessage() + "\nzbin: while the daemon runs, capture through it: publish {\"cmd\": \"compensate\", \"kind\": \""
                    + kind + "\"} to " + cfg.mqtt().topicRoot() + "/" + cfg.line() + "/command");
            return Main.EXIT_RUNTIME;
        }
        CompensationStore store = CompensationStore.load(cfg.stateDir());
        try (lock; ProfileMeterSession meter = ProfileMeterSession.open(cfg.meter(), Clock.systemUTC())) {
            List<Impedance> got = new CompensationCapture(meter, cfg.fixture(), Clock.systemUTC()).capture(k, conds, std, store);
            for (Impedance z : got)
                out.printf(Locale.ROOT, "%s at %s: %s%n", kind, SiValue.format(z.freqHz(), "Hz"), CompensationCapture.describe(k, z));
            out.println("stored in " + store.file());
            return Main.EXIT_OK;
        } catch (CompensationCapture.ImplausibleException e) {
            spec.commandLine().getErr().println("zbin: " + kind + " refused " + e.getMessage());
            return Main.EXIT_RUNTIME;
        } catch (MeterException e) {
            spec.commandLine().getErr().println("zbin: meter: " + e.getMessage());
            return Main.EXIT_RUNTIME;
        }
    }
}
