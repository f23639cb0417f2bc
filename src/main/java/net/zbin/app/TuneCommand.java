package net.zbin.app;

import com.fasterxml.jackson.databind.node.ArrayNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import java.io.IOException;
import java.io.PrintWriter;
import java.io.Writer;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import java.util.Locale;
import java.util.Optional;
import java.util.concurrent.Callable;
import net.zbin.core.BinTally;
import net.zbin.core.Grade;
import net.zbin.core.Recipe;
import net.zbin.core.RecordedReading;
import net.zbin.core.Sweep;
import net.zbin.core.Tuner;
import net.zbin.io.Json;
import net.zbin.io.ReadingSource;
import net.zbin.io.RecipeLoader;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVPrinter;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;
import picocli.CommandLine.Spec;
import picocli.CommandLine.Model.CommandSpec;

/** {@code zbin tune}: many candidate limit settings on one recorded lot, with yield and risk for each. */
@Command(name = "tune", mixinStandardHelpOptions = true, sortOptions = false,
        description = {"Sweep one or two recipe quantities over a recorded or simulated lot: yield per bin, fails by reason,",
                "and the estimated false-accept and false-reject rates for each setting; recommend one for a target."},
        footer = {"", "Sweeps: QUANTITY=FROM:TO:STEP or QUANTITY=V1,V2,…  with QUANTITY one of",
                "  grade.NAME (± half-width %), grade.NAME.low, grade.NAME.high (%), guard (U, % of reading),",
                "  d_max, q_min, esr_max (Ω), nominal (the part's unit)", "", "Examples:",
                "  zbin tune --recipe config/recipes/mlcc-x7r-100n.yaml --in simulators/lots/lot-mlcc-100n.csv --vary grade.J=3:7:0.5",
                "  zbin tune --recipe R.yaml --in lot.csv --vary guard=0:0.6:0.1 --vary d_max=0.02,0.025,0.03 --target-false-accept 0.1"})
public final class TuneCommand implements Callable<Integer> {
    @Option(names = "--recipe", required = true, paramLabel = "FILE", description = "the recipe to start from")
    Path recipeFile;
    @Option(names = "--in", required = true, paramLabel = "FILE.csv", description = "readings or record log")
    Path in;
    @Option(names = "--vary", required = true, paramLabel = "SWEEP", description = "a quantity and its values (once or twice)")
    List<String> vary;
    @Option(names = "--uncertainty-pct", paramLabel = "U", description = "expanded uncertainty U (k = 2) in % of reading for the risk (default: the recipe's guard_band.uncertainty_pct)")
    Double uncertaintyPct;
    @Option(names = "--target-false-accept", paramLabel = "PCT", description = "recommend the highest-yield setting whose estimated false-accept rate is at most this (%)")
    Double targetFalseAccept;
    @Option(names = "--json", description = "print JSON instead of a table")
    boolean json;
    @Option(names = "--csv", paramLabel = "FILE", description = "also write the table as CSV")
    Path csv;
    @picocli.CommandLine.Mixin
    ReadOptions reading;

    @Spec
    CommandSpec spec;

    @Override
    public Integer call() throws Exception {
        Recipe recipe = RecipeLoader.load(recipeFile);
        if (vary.size() > 2) throw new UsageException("--vary: give one or two sweeps (was " + vary.size() + ")");
        List<Sweep> sweeps = new ArrayList<>();
        for (String v : vary) {
            try {
                sweeps.add(Sweep.parse(v, recipe.partType()));
            } catch (IllegalArgumentException e) {
                throw new UsageException("--vary " + e.getMessage());
            }
        }
        double u = uncertaintyPct != null ? uncertaintyPct : recipe.guard().fromUncertainty() ? recipe.guard().widthPct() : Double.NaN;
        if (!(u > 0) && !(uncertaintyPct == null && recipe.guard().widthPct() == 0))
            throw new UsageException("--uncertainty-pct must be > 0 (was " + u + ")");
        ReadOptions.folderOf("--csv", csv);
        ReadOptions.folderOf("--report", reading.report);
        net.zbin.app.report.LotPlots plots = reading.report == null ? null : new net.zbin.app.report.LotPlots(recipe);
        net.zbin.core.LineMonitor monitor = reading.report == null ? null
                : new net.zbin.core.LineMonitor(recipe.monitor(), net.zbin.core.FixtureCheck.Limits.DEFAULT, recipe);
        BinTally baseTally = new BinTally();
        RowProgress bar = reading.progress(spec.commandLine().getErr(), in);
        Tuner tuner = new Tuner(recipe, sweeps, u);
        PrintWriter err = spec.commandLine().getErr();
        try (ReadingSource src = ReadingSource.open(in, b -> err.println("zbin: " + in + ": line " + b.line() + ": " + b.message() + " (skipped)"))) {
            RecordedReading r;
            while ((r = src.next()) != null) {
                tuner.add(r);
                if (plots != null) { // the lot as the recipe grades it now, for the report's plots
                    var g = net.zbin.core.Grader.recorded(recipe, r);
                    baseTally.add(g, !r.isCheck());
                    if (!r.isCheck()) plots.add(g);
                    var d = new net.zbin.core.Decision(r.line(), "", "", net.zbin.core.Trigger.Kind.parse(r.kind()), recipe.name(), g,
                            Double.NaN, false, r.attempt());
                    for (var c : monitor.observe(d)) plots.alarm(c);
                }
                if (bar != null) bar.row();
            }
            if (bar != null) bar.done();
        } catch (IOException e) {
            throw new UsageException(e.getMessage());
        }
        List<Tuner.Result> results = tuner.results();
        Optional<Tuner.Result> pick = targetFalseAccept == null ? Optional.empty() : results.stream().filter(Tuner.Result::valid)
                .filter(x -> x.falseAcceptPct() <= targetFalseAccept)
                .max(Comparator.comparingDouble((Tuner.Result x) -> x.tally().yieldPct()).thenComparingDouble(x -> -x.falseAcceptPct())
                        .thenComparingDouble(x -> -x.falseRejectPct()));
        PrintWriter out = spec.commandLine().getOut();
        if (json) out.println(Json.mapper().writerWithDefaultPrettyPrinter().writeValueAsString(toJson(recipe, results, pick, u)));
        else print(out, recipe, results, u);
        if (csv != null) try (Writer w = Files.newBufferedWriter(csv)) {
            writeCsv(w, recipe, results);
        }
        if (targetFalseAccept != null && !json) out.println(why(results, pick, targetFalseAccept));
        if (reading.report != null) {
            var h = new net.zbin.app.report.HtmlReport("zbin tune: " + recipe.name() + " on " + in.getFileName())
                    .para("Sweeps: " + String.join(" and ", vary) + ". Risk from U = " + u + " % of reading (k = 2): the measurement error is taken as normal "
                            + "with σ = U/2 of the reading; false accept = expected accepted parts whose true value lies outside their grade's limits, "
                            + "false reject = expected parts rejected on their value whose true value lies inside the widest limits, both in % of the parts finished.");
            if (targetFalseAccept != null) h.para(why(results, pick, targetFalseAccept));
            h.heading("Yield and risk against the setting").tuneCurves(results, sweeps.get(0).label(0).replace("=0", ""))
                    .heading("Every setting").tuneTable(results)
                    .heading("The lot under the recipe as it stands").summary(recipe, baseTally.snapshot())
                    .deviationHistogram(plots).lossHistogram(plots).runChart(plots).write(reading.report);
            if (!json) out.println("  report: " + reading.report);
        }
        return Main.EXIT_OK;
    }

    static String why(List<Tuner.Result> results, Optional<Tuner.Result> pick, double target) {
        if (pick.isEmpty()) return String.format(Locale.ROOT, "no setting keeps the estimated false accepts at or below %.4g %%; widen the guard band or tighten the limits", target);
        Tuner.Result p = pick.get();
        String s = String.format(Locale.ROOT, "recommended: %s — yield %.2f %% with an estimated %.4f %% false accepts (target ≤ %.4g %%) and %.4f %% false rejects",
                p.label(), p.tally().yieldPct(), p.falseAcceptPct(), target, p.falseRejectPct());
        Optional<Tuner.Result> better = results.stream().filter(Tuner.Result::valid).filter(x -> x.tally().yieldPct() > p.tally().yieldPct())
                .min(Comparator.comparingDouble(Tuner.Result::falseAcceptPct));
        return s + better.map(b -> String.format(Locale.ROOT, "; every setting with more yield passes more bad parts (the safest of them, %s, %.4f %%)",
                b.label(), b.falseAcceptPct())).orElse("; no setting has more yield");
    }

    private static List<String> columns(Recipe r) {
        List<String> c = new ArrayList<>(List.of("setting", "parts", "yield_pct"));
        for (Grade g : r.grades()) c.add("grade_" + g.name());
        c.addAll(List.of("low", "high", "gate", "other", "retests", "false_accept_pct", "false_reject_pct"));
        return c;
    }

    /** The counts of one result in the table's columns after "setting". */
    private static List<Object> cells(Recipe r, Tuner.Result x) {
        List<Object> c = new ArrayList<>();
        BinTally.Snapshot s = x.tally();
        c.add(s.parts());
        c.add(s.yieldPct());
        long graded = 0;
        for (Grade g : r.grades()) {
            long n = s.bins().stream().filter(b -> b.grade().equals(g.name())).mapToLong(BinTally.BinCount::count).sum();
            graded += n;
            c.add(n);
        }
        long low = s.bins().stream().filter(b -> b.grade().equals("low")).mapToLong(BinTally.BinCount::count).sum();
        long high = s.bins().stream().filter(b -> b.grade().equals("high")).mapToLong(BinTally.BinCount::count).sum();
        long gate = s.bins().stream().filter(b -> b.grade().equals("gate")).mapToLong(BinTally.BinCount::count).sum();
        c.add(low);
        c.add(high);
        c.add(gate);
        c.add(s.parts() - graded - low - high - gate);
        c.add(s.retests());
        c.add(x.falseAcceptPct());
        c.add(x.falseRejectPct());
        return c;
    }

    static void print(PrintWriter out, Recipe r, List<Tuner.Result> results, double u) {
        List<String> cols = columns(r);
        out.printf(Locale.ROOT, "recipe %s: %d settings; risk from U = %s %% of reading (k = 2)%n", r.name(), results.size(),
                Double.isNaN(u) ? "-" : String.format(Locale.ROOT, "%.4g", u));
        StringBuilder h = new StringBuilder(String.format(Locale.ROOT, "  %-30s", "setting"));
        for (String c : cols.subList(1, cols.size())) h.append(String.format(Locale.ROOT, " %9s", c.replace("grade_", "").replace("_pct", " %")));
        out.println(h);
        for (Tuner.Result x : results) {
            if (!x.valid()) {
                out.printf(Locale.ROOT, "  %-30s not a valid recipe: %s%n", x.label(), x.problem());
                continue;
            }
            StringBuilder line = new StringBuilder(String.format(Locale.ROOT, "  %-30s", x.label()));
            for (Object v : cells(r, x))
                line.append(v instanceof Double d ? String.format(Locale.ROOT, " %9.4f", d) : String.format(Locale.ROOT, " %9s", v));
            out.println(line);
        }
    }

    static ObjectNode toJson(Recipe r, List<Tuner.Result> results, Optional<Tuner.Result> pick, double u) {
        ObjectNode n = Json.object();
        n.put("recipe", r.name());
        Json.num(n, "uncertainty_pct", u);
        ArrayNode arr = n.putArray("settings");
        for (Tuner.Result x : results) {
            ObjectNode o = arr.addObject();
            o.put("setting", x.label());
            ArrayNode vals = o.putArray("values");
            x.values().forEach(vals::add);
            o.put("valid", x.valid());
            if (!x.valid()) {
                o.put("problem", x.problem());
                continue;
            }
            o.put("total", x.tally().parts());
            net.zbin.io.TallyJson.put(o, x.tally());
            Json.num(o, "false_accept_pct", x.falseAcceptPct());
            Json.num(o, "false_reject_pct", x.falseRejectPct());
        }
        pick.ifPresent(p -> n.put("recommended", p.label()));
        return n;
    }

    static void writeCsv(Writer w, Recipe r, List<Tuner.Result> results) throws IOException {
        try (CSVPrinter p = new CSVPrinter(w, CSVFormat.DEFAULT.builder().setRecordSeparator("\n").setHeader(columns(r).toArray(String[]::new)).get())) {
            for (Tuner.Result x : results) {
                if (!x.valid()) continue;
                List<Object> row = new ArrayList<>();
                row.add(x.label());
                row.addAll(cells(r, x));
                p.printRecord(row);
            }
        }
    }
}
