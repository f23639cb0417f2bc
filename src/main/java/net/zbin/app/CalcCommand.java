package net.zbin.app;

import com.fasterxml.jackson.databind.node.ObjectNode;
import java.io.PrintWriter;
import java.nio.file.Path;
import java.time.Instant;
import java.util.Locale;
import java.util.Optional;
import java.util.concurrent.Callable;
import net.zbin.core.Compensation;
import net.zbin.core.CompensationSource;
import net.zbin.core.Decision;
import net.zbin.core.Grader;
import net.zbin.core.Grading;
import net.zbin.core.Impedance;
import net.zbin.core.ModelPolicy;
import net.zbin.core.PartType;
import net.zbin.core.Reading;
import net.zbin.core.Recipe;
import net.zbin.core.SiValue;
import net.zbin.io.DecisionJson;
import net.zbin.io.Json;
import net.zbin.io.RecipeLoader;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;

/** {@code zbin calc}: one reading explained, optionally compensated and graded by a recipe. */
@Command(name = "calc", mixinStandardHelpOptions = true, sortOptions = false,
        description = {"Explain one reading: |Z|, θ, G/B, Cs/Cp, Ls/Lp, Rs/Rp, D, Q, ESR and the model choice.",
                "Give R and X, or |Z| and θ. Numbers take SI prefixes: 1k, 2.2p, 4.7u, 100n, 2p2, 4K7.",
                "With --recipe the reading is graded as the daemon would grade it."},
        footer = {"", "Examples:", "  zbin calc --freq 1k --z 1000 --theta -88.4",
                "  zbin calc --freq 1M --r 0.5 --x -1007.3 --open-c 2p --json",
                "  zbin calc --freq 1k --r 0.8 --x -1591 --recipe config/recipes/mlcc-x7r-100n.yaml"})
public final class CalcCommand implements Callable<Integer> {
    @Option(names = "--freq", required = true, paramLabel = "HZ", converter = SiConverter.Hertz.class, description = "test frequency in Hz")
    Double freq;
    @Option(names = "--r", paramLabel = "OHM", converter = SiConverter.Ohm.class, description = "measured R in Ω (with --x)")
    Double r;
    @Option(names = "--x", paramLabel = "OHM", converter = SiConverter.Ohm.class, description = "measured X in Ω, negative for capacitive (with --r)")
    Double x;
    @Option(names = "--z", paramLabel = "OHM", converter = SiConverter.Ohm.class, description = "measured |Z| in Ω (with --theta)")
    Double z;
    @Option(names = "--theta", paramLabel = "DEG", converter = SiConverter.Degree.class, description = "measured phase in degrees, -90..90 (with --z)")
    Double theta;
    @Option(names = "--open-r", paramLabel = "OHM", converter = SiConverter.Ohm.class, description = "open compensation: fixture R in Ω (with --open-x)")
    Double openR;
    @Option(names = "--open-x", paramLabel = "OHM", converter = SiConverter.Ohm.class, description = "open compensation: fixture X in Ω")
    Double openX;
    @Option(names = "--open-c", paramLabel = "F", converter = SiConverter.Farad.class, description = "open compensation as stray capacitance in F (e.g. 2p)")
    Double openC;
    @Option(names = "--open-g", paramLabel = "S", converter = SiConverter.Siemens.class, description = "stray conductance in S with --open-c (default 0)")
    Double openG;
    @Option(names = "--short-r", paramLabel = "OHM", converter = SiConverter.Ohm.class, description = "short compensation: residual R in Ω (with --short-x)")
    Double shortR;
    @Option(names = "--short-x", paramLabel = "OHM", converter = SiConverter.Ohm.class, description = "short compensation: residual X in Ω")
    Double shortX;
    @Option(names = "--recipe", paramLabel = "FILE", description = "grade the reading with this recipe")
    Path recipeFile;
    @Option(names = "--json", description = "print JSON instead of text")
    boolean json;

    @picocli.CommandLine.Spec
    picocli.CommandLine.Model.CommandSpec spec;

    @Override
    public Integer call() throws Exception {
        Impedance raw = reading();
        Compensation comp = compensation();
        Recipe recipe = recipeFile == null ? null : RecipeLoader.load(recipeFile);
        Optional<Impedance> corrected = comp.correct(raw);
        if (corrected.isEmpty() && recipe == null)
            throw new UsageException("the reading equals the open compensation: it is the fixture, not a part");
        PrintWriter out = spec.commandLine().getOut();
        Impedance zc = corrected.orElse(null);
        PartType guess = recipe != null ? recipe.partType() : guessType(zc);
        // With a recipe the model is the recipe's, resolved once from its nominal; without one, from this reading.
        ModelPolicy.Choice choice = recipe != null ? recipe.modelChoice()
                : zc == null ? null : ModelPolicy.DEFAULT.choose(guess, zc.zOhm());
        Decision decision = null;
        if (recipe != null) {
            Grading g = Grader.grade(recipe, Reading.of(raw), comp, 0);
            decision = new Decision(-1, null, null, net.zbin.core.Trigger.Kind.PART, recipe.name(), g, Double.NaN, false, 0);
        }
        if (json) out.println(Json.mapper().writerWithDefaultPrettyPrinter().writeValueAsString(toJson(raw, zc, comp, choice, decision)));
        else printText(out, raw, zc, comp, choice, decision, recipe);
        return Main.EXIT_OK;
    }

    private Impedance reading() throws UsageException {
        boolean rx = r != null || x != null, polar = z != null || theta != null;
        if (rx == polar) throw new UsageException("give the reading as --r and --x, or as --z and --theta (one form, not both)");
        try {
            if (rx) {
                if (r == null || x == null) throw new UsageException("--r and --x go together");
                return new Impedance(freq, r, x);
            }
            if (z == null || theta == null) throw new UsageException("--z and --theta go together");
            return Impedance.fromPolar(freq, z, theta);
        } catch (IllegalArgumentException e) {
            throw new UsageException(e.getMessage().replace("freqHz", "--freq").replace("rOhm", "--r").replace("xOhm", "--x")
                    .replace("zOhm", "--z").replace("thetaDeg", "--theta"));
        }
    }

    private Compensation compensation() throws UsageException {
        boolean openRx = openR != null || openX != null;
        if (openRx && openC != null) throw new UsageException("give the open as --open-r/--open-x or as --open-c, not both");
        if (openG != null && openC == null) throw new UsageException("--open-g needs --open-c");
        if (openRx && (openR == null || openX == null)) throw new UsageException("--open-r and --open-x go together");
        if ((shortR == null) != (shortX == null)) throw new UsageException("--short-r and --short-x go together");
        Impedance open = null, shortZ = null;
        try {
            if (openRx) open = new Impedance(freq, openR, openX);
            if (openC != null) open = Compensation.openFromAdmittance(freq, openC, openG == null ? 0 : openG);
            if (shortR != null) shortZ = new Impedance(freq, shortR, shortX);
            if (open == null && shortZ == null) return Compensation.none(freq);
            return new Compensation(freq, CompensationSource.USER, Instant.now(), open, shortZ, null, null);
        } catch (IllegalArgumentException e) {
            throw new UsageException("compensation: " + e.getMessage());
        }
    }

    private static PartType guessType(Impedance z) {
        if (z == null || z.xOhm() == 0) return PartType.RESISTOR;
        return z.xOhm() < 0 ? PartType.CAPACITOR : PartType.INDUCTOR;
    }

    private static ObjectNode toJson(Impedance raw, Impedance z, Compensation comp, ModelPolicy.Choice choice, Decision d) {
        ObjectNode n = Json.object();
        Json.num(n, "freq_hz", raw.freqHz());
        boolean has = z != null;
        Json.num(n, "r_ohm", has ? z.rOhm() : Double.NaN);
        Json.num(n, "x_ohm", has ? z.xOhm() : Double.NaN);
        Json.num(n, "z_ohm", has ? z.zOhm() : Double.NaN);
        Json.num(n, "theta_deg", has ? z.thetaDeg() : Double.NaN);
        Json.num(n, "g_s", has ? z.gS() : Double.NaN);
        Json.num(n, "b_s", has ? z.bS() : Double.NaN);
        Json.num(n, "cs_f", has ? z.csF() : Double.NaN);
        Json.num(n, "cp_f", has ? z.cpF() : Double.NaN);
        Json.num(n, "ls_h", has ? z.lsH() : Double.NaN);
        Json.num(n, "lp_h", has ? z.lpH() : Double.NaN);
        Json.num(n, "rs_ohm", has ? z.rsOhm() : Double.NaN);
        Json.num(n, "rp_ohm", has ? z.rpOhm() : Double.NaN);
        Json.num(n, "d", has ? z.d() : Double.NaN);
        Json.num(n, "q", has ? z.q() : Double.NaN);
        Json.num(n, "esr_ohm", has ? z.esrOhm() : Double.NaN);
        Json.str(n, "model", choice == null ? null : choice.model().key());
        Json.str(n, "model_reason", choice == null ? null : choice.reason());
        Json.num(n, "raw_r_ohm", raw.rOhm());
        Json.num(n, "raw_x_ohm", raw.xOhm());
        n.put("comp", comp.isApplied() ? comp.source().key() : "none");
        if (d != null) n.set("decision", DecisionJson.encode(d));
        return n;
    }

    private static void printText(PrintWriter out, Impedance raw, Impedance z, Compensation comp, ModelPolicy.Choice choice, Decision d,
                                  Recipe recipe) {
        out.printf(Locale.ROOT, "Reading at %s%n", SiValue.format(raw.freqHz(), "Hz"));
        out.printf(Locale.ROOT, "  as read      R = %-12s X = %s%n", SiValue.format(raw.rOhm(), "ohm"), SiValue.format(raw.xOhm(), "ohm"));
        if (comp.isApplied())
            out.printf(Locale.ROOT, "  compensated  R = %-12s X = %s%n", z == null ? "-" : SiValue.format(z.rOhm(), "ohm"),
                    z == null ? "- (reading equals the open)" : SiValue.format(z.xOhm(), "ohm"));
        if (z != null) {
            out.printf(Locale.ROOT, "  |Z| = %-12s θ  = %.4f°%n", SiValue.format(z.zOhm(), "ohm"), z.thetaDeg());
            out.printf(Locale.ROOT, "  G   = %-12s B  = %s%n", SiValue.format(z.gS(), "S"), SiValue.format(z.bS(), "S"));
            out.printf(Locale.ROOT, "  Cs  = %-12s Cp = %s%n", SiValue.format(z.csF(), "F"), SiValue.format(z.cpF(), "F"));
            out.printf(Locale.ROOT, "  Ls  = %-12s Lp = %s%n", SiValue.format(z.lsH(), "H"), SiValue.format(z.lpH(), "H"));
            out.printf(Locale.ROOT, "  Rs  = %-12s Rp = %s%n", SiValue.format(z.rsOhm(), "ohm"), SiValue.format(z.rpOhm(), "ohm"));
            out.printf(Locale.ROOT, "  D   = %-12s Q  = %-10s ESR = %s%n", SiValue.ratio(z.d()), SiValue.ratio(z.q()), SiValue.format(z.esrOhm(), "ohm"));
        }
        if (choice != null) {
            out.printf(Locale.ROOT, "  model: %s (%s)%n", choice.model().key(), recipe == null
                    ? choice.reason() + ", from this reading's |Z|" : RecipeText.modelWhy(recipe));
        }
        if (d != null) {
            Grading g = d.grading();
            out.printf(Locale.ROOT, "Decision under recipe %s: bin %d, grade %s, %s (%s)%n", d.recipe(), g.bin(), g.grade(),
                    g.verdict().key(), g.reason().code());
            if (g.param() != null)
                out.printf(Locale.ROOT, "  %s = %s, deviation %+.4f %%%n", g.param().label(), SiValue.format(g.value(), g.unit()), g.devPct());
        }
    }
}
