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
import net.zbin.app.report.Shown;
import net.zbin.app.report.Worth;
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
        description = {"Sweep one or two recipe settings over a lot and show yield, bins and the lot's risks for each.",
                "Each row is exactly what zbin replay gives with the recipe edited to that setting. False accept and false",
                "reject are the lot's global consumer's and producer's risk (JCGM 106:2012 §9.5): the process is estimated",
                "from the lot with the measurement's variance removed; only the value is taken as uncertain.",
                "Recommends the setting of most yield (or most value, with --grade-value) within a false-accept target."},
        footer = {"", "Sweeps: QUANTITY=FROM:TO:STEP or QUANTITY=V1,V2,…  with QUANTITY one of",
                "  grade.NAME (± half-width %%), grade.NAME.low, grade.NAME.high (%%), guard (U, %% of reading),",
                "  d_max, q_min, esr_max (Ω), nominal (the part's unit)", "", "Examples:",
                "  zbin tune --recipe config/recipes/mlcc-x7r-100n.yaml --in simulators/lots/lot-mlcc-100n.csv --vary grade.J=3:7:0.5",
                "  zbin tune --recipe R.yaml --in lot.csv --vary guard=0:0.6:0.1 --vary d_max=0.02,0.025,0.03 --target-false-accept 0.1"})
public final class TuneCommand implements Callable<Integer> {
    @Option(names = "--recipe", required = true, paramLabel = "FILE", description = "the recipe to start from")
    Path recipeFile;
    @Option(names = "--in", paramLabel = "FILE.csv", description = "readings or record log (or --db with --line and --lot)")
    Path in;
    @Option(names = "--vary", required = true, paramLabel = "SWEEP", description = "a quantity and its values (once or twice)")
    List<String> vary;
    @Option(names = "--uncertainty-pct", paramLabel = "U", converter = PercentConverter.class,
            description = "expanded uncertainty U (k = 2) in %% of reading for the risk (default: the recipe's guard_band.uncertainty_pct)")
    Double uncertaintyPct;
    @Option(names = "--target-false-accept", paramLabel = "PCT", converter = PercentConverter.class,
            description = "recommend the setting of most yield (or value) whose false-accept risk is at most this, in %% of the parts (0.01 or 0.01%%)")
    Double targetFalseAccept;
    @Option(names = "--grade-value", paramLabel = "GRADE=V", description = "what a part in a grade is worth (repeat; default 1 each): "
            + "the recommendation weighs the grades, so parts moved from a tight grade to a wide one count as lost value")
    java.util.Map<String, Double> gradeValue;
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
        Recipe recipe = reading.forLine(RecipeLoader.load(recipeFile));
        if (vary.size() > 2) throw new UsageException("--vary: give one or two sweeps (was " + vary.size() + ")");
        List<Sweep> sweeps = new ArrayList<>();
        for (String v : vary) {
            try {
                Sweep sw = Sweep.parse(v, recipe.partType());
                sw.check(recipe);
                sweeps.add(sw);
            } catch (IllegalArgumentException e) {
                throw new UsageException("--vary " + v + ": " + e.getMessage());
            }
        }
        if (sweeps.size() == 2 && sweeps.get(0).quantity() == sweeps.get(1).quantity() && java.util.Objects.equals(sweeps.get(0).grade(), sweeps.get(1).grade()))
            throw new UsageException("--vary: the two sweeps vary the same quantity (" + vary.get(0) + ", " + vary.get(1) + ")");
        if (targetFalseAccept != null && !(targetFalseAccept >= 0 && targetFalseAccept <= 100))
            throw new UsageException("--target-false-accept must be 0..100 % of the parts (was " + targetFalseAccept + ")");
        if (targetFalseAccept != null && sweeps.stream().anyMatch(Sweep::gate))
            throw new UsageException("--target-false-accept cannot be met by sweeping a gate (" + sweeps.stream().filter(Sweep::gate)
                    .map(x -> x.quantity().name().toLowerCase(Locale.ROOT)).findFirst().orElse("") + "): the risk models the value's uncertainty only,"
                    + " not that of D, Q or ESR, and a tighter gate lowers the value risk merely by removing parts; sweep the gate without a target,"
                    + " or sweep grade limits or the guard band for the target");
        if (gradeValue != null) for (var e : gradeValue.entrySet()) {
            if (recipe.grades().stream().noneMatch(g -> g.name().equals(e.getKey())))
                throw new UsageException("--grade-value " + e.getKey() + ": no grade '" + e.getKey() + "' in recipe " + recipe.name() + " (it has "
                        + String.join(", ", recipe.grades().stream().map(Grade::name).toList()) + ")");
            if (!(e.getValue() >= 0) || !Double.isFinite(e.getValue()))
                throw new UsageException("--grade-value " + e.getKey() + " must be >= 0 (was " + e.getValue() + ")");
        }
        double u;
        if (uncertaintyPct != null) {
            if (!(uncertaintyPct > 0) || !Double.isFinite(uncertaintyPct))
                throw new UsageException("--uncertainty-pct must be > 0 (was " + uncertaintyPct + ")");
            u = uncertaintyPct;
        } else if (recipe.guard().fromUncertainty() && recipe.guard().widthPct() > 0) u = recipe.guard().widthPct();
        else if (targetFalseAccept != null || recipe.guard().widthPct() > 0)
            throw new UsageException("give --uncertainty-pct U (the meter's expanded uncertainty, % of reading) for the risk figures: recipe "
                    + recipe.name() + " states " + (recipe.guard().widthPct() > 0 ? "its guard band as guard_band.pct, not as an uncertainty"
                    : "no guard_band.uncertainty_pct"));
        else u = Double.NaN;
        ReadOptions.folderOf("--csv", csv);
        ReadOptions.folderOf("--report", reading.report);
        net.zbin.app.report.LotPlots plots = reading.report == null ? null : new net.zbin.app.report.LotPlots(recipe);
        net.zbin.core.LineEngine engine = reading.engine(recipe);
        BinTally baseTally = new BinTally();
        RowProgress bar = reading.progress(spec.commandLine().getErr(), in);
        Tuner tuner = new Tuner(recipe, sweeps, u);
        PrintWriter err = spec.commandLine().getErr();
        try (ReadingSource src = reading.open(in, b -> err.println("zbin: " + reading.inputName(in) + ": line " + b.line() + ": " + b.message() + " (skipped)"))) {
            RecordedReading r;
            while ((r = src.next()) != null) {
                tuner.add(r);
                if (plots != null) { // the lot as the line's engine decides it under the recipe now, for the report's plots
                    var d = engine.regrade(r);
                    baseTally.add(d.grading(), !r.isCheck());
                    if (!r.isCheck()) plots.add(d.grading());
                    for (var c : engine.observe(d)) plots.alarm(c);
                }
                if (bar != null) bar.row();
            }
            if (bar != null) bar.done();
        } catch (IOException e) {
            throw new UsageException(e.getMessage());
        }
        List<Tuner.Result> results = tuner.results();
        Worth worth = new Worth(recipe, gradeValue);
        net.zbin.core.RiskModel model = tuner.model();
        Optional<Tuner.Result> pick = targetFalseAccept == null ? Optional.empty() : results.stream().filter(Tuner.Result::valid)
                .filter(x -> x.falseAcceptPct() <= targetFalseAccept)
                .max(Comparator.comparingDouble(worth::of).thenComparingDouble(x -> -x.falseAcceptPct())
                        .thenComparingDouble(x -> -x.falseRejectPct()));
        PrintWriter out = spec.commandLine().getOut();
        // What re-measuring near a limit gains on this lot, when the recipe splits U into its repeatability part
        List<net.zbin.core.RemeasureGain> gains = model != null && model.estimated() && recipe.guard().repeatabilityPct() > 0
                ? net.zbin.core.RemeasureGain.estimate(recipe, model, u, Math.max(3, recipe.remeasure().maxReadings()), 1) : List.of();
        if (json) {
            ObjectNode n = toJson(recipe, results, pick, u, model, worth);
            if (!gains.isEmpty()) {
                ArrayNode g = n.putArray("remeasure_gain");
                for (var x : gains) {
                    ObjectNode o = g.addObject();
                    o.put("max_readings", x.maxReadings());
                    Json.num(o, "false_reject_pct", x.falseRejectPct());
                    Json.num(o, "false_accept_pct", x.falseAcceptPct());
                    Json.num(o, "downgraded_pct", x.downgradedPct());
                    Json.num(o, "remeasured_pct", x.remeasuredPct());
                    Json.num(o, "mean_readings", x.meanReadings());
                }
            }
            out.println(Json.mapper().writerWithDefaultPrettyPrinter().writeValueAsString(n));
        } else {
            print(out, recipe, results, u, model, worth);
            if (!gains.isEmpty()) {
                out.printf(Locale.ROOT, "  re-measuring near a limit, the recipe as it stands (U %.4g %% of which %.4g %% repeatability; %s),"
                        + " estimated on %d simulated parts of this lot's process:%n", u, Math.min(u, recipe.guard().repeatabilityPct()),
                        recipe.remeasure().on() ? "near_pct " + recipe.remeasure().nearPct() : "near_pct U", net.zbin.core.RemeasureGain.PARTS);
                out.printf(Locale.ROOT, "    %-13s %14s %14s %13s %12s %14s%n", "max readings", "false reject %", "false accept %", "downgraded %",
                        "re-read %", "readings/part");
                for (var x : gains)
                    out.printf(Locale.ROOT, "    %-13d %14.3f %14.4f %13.3f %12.2f %14.3f%n", x.maxReadings(), x.falseRejectPct(), x.falseAcceptPct(),
                            x.downgradedPct(), x.remeasuredPct(), x.meanReadings());
            }
        }
        if (csv != null) try (Writer w = Files.newBufferedWriter(csv)) {
            writeCsv(w, recipe, results, worth);
        }
        if (targetFalseAccept != null && !json) out.println(why(results, pick, targetFalseAccept, worth, model));
        if (reading.report != null) {
            var h = new net.zbin.app.report.HtmlReport("zbin tune: " + recipe.name() + " on " + (in != null ? in.getFileName().toString() : reading.inputName(in)))
                    .para("Sweeps: " + String.join(" and ", vary) + ". " + riskText(u, model));
            if (targetFalseAccept != null) h.para(why(results, pick, targetFalseAccept, worth, model));
            h.heading("Yield and risk against the setting").tuneCurves(results, sweeps, pick.orElse(null), targetFalseAccept, recipe.partType().unit())
                    .heading("Every setting").tuneTable(worth, results)
                    .heading("The lot under the recipe as it stands").summary(recipe, baseTally.snapshot())
                    .deviationHistogram(plots).lossHistogram(plots).runChart(plots).write(reading.report);
            if (!json) out.println("  report: " + reading.report);
        }
        return Main.EXIT_OK;
    }

    /** What the risk figures are, for the table's head and the report. */
    static String riskText(double u, net.zbin.core.RiskModel model) {
        if (model == null) return "No risk figures: no uncertainty given.";
        if (!model.estimated()) return "No risk figures: " + model.describe() + ".";
        return String.format(Locale.ROOT, "Risk: the lot's global consumer's (false accept) and producer's (false reject) risk of JCGM 106:2012 §9.5,"
                + " in %% of the parts finished, with U = %.4g %% of reading (k = 2) and the %s; the value's uncertainty only"
                + " (D, Q and ESR are taken as read).", u, model.describe());
    }

    static String why(List<Tuner.Result> results, Optional<Tuner.Result> pick, double target, Worth worth, net.zbin.core.RiskModel model) {
        if (model != null && !model.estimated()) return "no recommendation: no risk figures (" + model.describe() + ")";
        if (pick.isEmpty()) return String.format(Locale.ROOT, "no setting keeps the false-accept risk at or below %.4g %%; widen the guard band or tighten the limits", target);
        Tuner.Result p = pick.get();
        String s = String.format(Locale.ROOT, "recommended: %s — yield %s%s with %.4f %% false-accept risk (target ≤ %.4g %%) and %.4f %% false-reject risk",
                p.label(), Shown.of("%.2f %%", p.tally().yieldPct()), worth.weighted() ? String.format(Locale.ROOT, ", %s %.2f", worth.describe(), worth.of(p)) : "",
                p.falseAcceptPct(), target, p.falseRejectPct());
        Optional<Tuner.Result> better = results.stream().filter(Tuner.Result::valid).filter(x -> worth.of(x) > worth.of(p))
                .min(Comparator.comparingDouble(Tuner.Result::falseAcceptPct));
        String what = worth.weighted() ? "value" : "yield";
        return s + better.map(b -> String.format(Locale.ROOT, "; every setting with more %s passes more bad parts (the safest of them, %s, %.4f %%)",
                what, b.label(), b.falseAcceptPct())).orElse("; no setting has more " + what);
    }

    static void print(PrintWriter out, Recipe r, List<Tuner.Result> results, double u, net.zbin.core.RiskModel model, Worth worth) {
        List<String> cols = worth.columns();
        out.printf(Locale.ROOT, "recipe %s: %d settings%n  %s%n", r.name(), results.size(), riskText(u, model));
        if (worth.weighted()) out.printf(Locale.ROOT, "  value %%: %s, in %% of the parts finished%n", worth.describe());
        StringBuilder h = new StringBuilder(String.format(Locale.ROOT, "  %-30s", "setting"));
        for (String c : cols.subList(1, cols.size())) h.append(String.format(Locale.ROOT, " %9s", c.replace("grade_", "").replace("_pct", " %")));
        out.println(h);
        for (Tuner.Result x : results) {
            if (!x.valid()) {
                out.printf(Locale.ROOT, "  %-30s not a valid recipe: %s%n", x.label(), x.problem());
                continue;
            }
            StringBuilder line = new StringBuilder(String.format(Locale.ROOT, "  %-30s", x.label()));
            for (Object v : worth.cells(x))
                line.append(String.format(Locale.ROOT, " %9s", v instanceof Double d ? Shown.of("%.4f", d) : v));
            out.println(line);
        }
    }

    static ObjectNode toJson(Recipe r, List<Tuner.Result> results, Optional<Tuner.Result> pick, double u, net.zbin.core.RiskModel model, Worth worth) {
        ObjectNode n = Json.object();
        n.put("recipe", r.name());
        Json.num(n, "uncertainty_pct", u);
        if (model != null) {
            ObjectNode m = n.putObject("risk_model");
            m.put("kind", "JCGM 106:2012 9.5 global risk, normal process and measurement, process from the lot");
            Json.num(m, "process_mean_pct", model.processMeanPct());
            Json.num(m, "process_sigma_pct", model.processSigmaPct());
            Json.num(m, "u_pct", model.uPct());
            m.put("process_resolved", model.resolved());
            m.put("graded_parts", model.parts());
            m.put("process_estimated", model.estimated());
        }
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
            if (worth.weighted()) Json.num(o, "value_pct", worth.of(x));
        }
        pick.ifPresent(p -> n.put("recommended", p.label()));
        return n;
    }

    static void writeCsv(Writer w, Recipe r, List<Tuner.Result> results, Worth worth) throws IOException {
        try (CSVPrinter p = new CSVPrinter(w, CSVFormat.DEFAULT.builder().setRecordSeparator("\n").setHeader(worth.columns().toArray(String[]::new)).get())) {
            for (Tuner.Result x : results) {
                if (!x.valid()) continue;
                List<Object> row = new ArrayList<>();
                row.add(x.label());
                row.addAll(worth.cells(x));
                p.printRecord(row);
            }
        }
    }
}
