package net.zbin.app;

import java.io.PrintWriter;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.concurrent.Callable;
import net.zbin.app.report.HtmlReport;
import net.zbin.app.report.LotPlots;
import net.zbin.app.report.Shown;
import net.zbin.core.Grade;
import net.zbin.core.GradingMode;
import net.zbin.core.LineEngine;
import net.zbin.core.Recipe;
import net.zbin.core.RecordedReading;
import net.zbin.core.Wilson;
import net.zbin.io.ReadingSource;
import net.zbin.io.RecipeLoader;
import net.zbin.io.db.LotRecord;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;

/**
 * {@code zbin report}: the quality record of a lot (or a shift) from the historian's database, as one self-contained
 * HTML file: what the line decided — yield, bins, reasons, retests, fixture checks — the parts' capability, the alarms
 * raised and acknowledged while it ran, and the compensation in force and captured; then the lot graded again from the
 * stored readings under the recipe, for its drift charts and plots.
 */
@Command(name = "report", mixinStandardHelpOptions = true, sortOptions = false,
        description = {"Write the quality record of a lot, or of a line's shift (--from/--to), from the historian's database as HTML."})
public final class ReportCommand implements Callable<Integer> {
    @Option(names = "--recipe", required = true, paramLabel = "FILE", description = "the recipe the lot was decided under (its limits give Cp/Cpk)")
    Path recipeFile;
    @Option(names = "--out", required = true, paramLabel = "FILE.html", description = "where to write the record")
    Path out;
    @picocli.CommandLine.Mixin
    ReadOptions reading;

    @picocli.CommandLine.Spec
    picocli.CommandLine.Model.CommandSpec spec;

    @Override
    public Integer call() throws Exception {
        reading.checkDb();
        if (reading.report != null) throw new UsageException("--report: the record is written to --out");
        ReadOptions.folderOf("--out", out);
        Recipe recipe = reading.forLine(RecipeLoader.load(recipeFile));
        LotRecord rec;
        try {
            rec = LotRecord.read(reading.login(), reading.dbLine, reading.dbLot, reading.fromInstant(), reading.toInstant());
        } catch (java.sql.SQLException e) {
            throw new UsageException("database: " + e.getMessage().lines().findFirst().orElse(""));
        }
        if (!rec.recipes().contains(recipe.name()))
            throw new UsageException("--recipe " + recipe.name() + ": the line decided this selection under " + String.join(", ", rec.recipes()));
        String what = "line " + rec.line() + (rec.lot() == null ? "" : ", lot " + rec.lot());
        HtmlReport h = new HtmlReport("zbin quality record: " + what);
        h.para("Decisions from " + rec.first() + " to " + rec.last() + " (UTC), under recipe " + String.join(", ", rec.recipes())
                + ", as the line recorded them in the plant database.");
        long parts = 0, passed = 0;
        for (LotRecord.Bin b : rec.bins()) {
            parts += b.parts();
            if (b.verdict().equals("pass")) passed += b.parts();
        }
        double[] ci = Wilson.interval(passed, parts, Wilson.Z95);
        h.heading("Decisions as recorded");
        h.table(List.of("parts finished", "passed", "yield", "95 % interval", "retests", "fixture checks passed", "failed"),
                List.of(List.of(Long.toString(parts), Long.toString(passed), pct(parts == 0 ? Double.NaN : 100.0 * passed / parts),
                        pct(ci[0] * 100) + " – " + pct(ci[1] * 100), Long.toString(rec.retests()), Long.toString(rec.checksPassed()),
                        Long.toString(rec.checksFailed()))), 0);
        List<List<String>> bins = new ArrayList<>();
        java.util.Map<String, Long> reasons = new java.util.TreeMap<>();
        java.util.Map<String, long[]> byBin = new java.util.LinkedHashMap<>();
        for (LotRecord.Bin b : rec.bins()) {
            byBin.computeIfAbsent(b.bin() + "\u0000" + b.grade() + "\u0000" + b.verdict(), k -> new long[1])[0] += b.parts();
            reasons.merge(b.reason(), b.parts(), Long::sum);
        }
        for (var e : byBin.entrySet()) {
            String[] k = e.getKey().split("\u0000");
            bins.add(List.of(k[0], k[1], k[2], Long.toString(e.getValue()[0]), pct(100.0 * e.getValue()[0] / parts)));
        }
        h.table(List.of("bin", "grade", "verdict", "parts", "share"), bins, 3);
        List<List<String>> rs = new ArrayList<>();
        reasons.forEach((k, v) -> rs.add(List.of(k, Long.toString(v))));
        h.table(List.of("reason (final decision)", "parts"), rs, 1);

        h.heading("Capability");
        Grade widest = recipe.mode() == GradingMode.CONCENTRIC ? recipe.grades().get(recipe.grades().size() - 1) : null;
        double lsl = widest != null ? widest.lowPct() : recipe.grades().get(0).lowPct();
        double usl = widest != null ? widest.highPct() : recipe.grades().get(recipe.grades().size() - 1).highPct();
        h.table(List.of("graded parts", "deviation mean", "σ", "limits", "Cp", "Cpk"),
                List.of(List.of(Long.toString(rec.graded()), Shown.of("%+.4f %%", rec.devMeanPct()),
                        Shown.of("%.4f %%", rec.devSigmaPct()), String.format(Locale.ROOT, "%+.3g … %+.3g %%", lsl, usl),
                        Shown.of("%.3g", net.zbin.core.Capability.cp(lsl, usl, rec.devSigmaPct())),
                        Shown.of("%.3g", net.zbin.core.Capability.cpk(lsl, usl, rec.devMeanPct(), rec.devSigmaPct())))), 0);

        h.heading("Alarms and acknowledgements");
        List<List<String>> al = new ArrayList<>();
        for (LotRecord.Alarm a : rec.alarms()) {
            // a clearing is recorded with the time its alarm was raised
            String event = a.ackBy() != null ? "acknowledged by " + a.ackBy() : a.active() ? "raised" : "cleared (the alarm raised at this time)";
            String when = a.ackBy() != null && a.ackAt() != null ? a.ackAt().toString() : a.since().toString();
            al.add(List.of(when, a.code(), a.severity(), event, a.ackBy() != null ? a.ackNote() : a.message()));
        }
        if (al.isEmpty()) h.para("No alarm was raised or acknowledged while the lot ran.");
        else h.table(List.of("time (UTC)", "alarm", "severity", "event", "message or note"), al, 5);

        h.heading("Compensation");
        List<List<String>> cp = new ArrayList<>();
        for (LotRecord.Capture c : rec.captures())
            cp.add(List.of(c.at().toString(), c.kind(), String.format(Locale.ROOT, "%.6g", c.freqHz()), String.format(Locale.ROOT, "%.6g", c.rOhm()),
                    String.format(Locale.ROOT, "%.6g", c.xOhm()), c.at().isAfter(rec.first()) ? "during the lot" : "in force at its start"));
        if (cp.isEmpty()) h.para("No compensation capture is recorded for this line before or during the lot.");
        else h.table(List.of("captured (UTC)", "kind", "freq (Hz)", "R (Ω)", "X (Ω)", ""), cp, 2);
        h.para(rec.checksPassed() + " fixture checks passed, " + rec.checksFailed() + " failed" + (rec.failedChecks().isEmpty() ? "." : ":"));
        if (!rec.failedChecks().isEmpty()) {
            List<List<String>> fc = new ArrayList<>();
            for (LotRecord.Check c : rec.failedChecks())
                fc.add(List.of(c.at().toString(), c.kind(), c.reason(), String.format(Locale.ROOT, "%.6g", c.rOhm()), String.format(Locale.ROOT, "%.6g", c.xOhm())));
            h.table(List.of("time (UTC)", "check", "reason", "R (Ω)", "X (Ω)"), fc, 3);
        }

        // the stored readings graded again by the line's engine under the recipe: its monitor and plots
        LineEngine engine = reading.engine(recipe);
        LotPlots plots = new LotPlots(recipe);
        try (ReadingSource src = reading.open(null, b -> spec.commandLine().getErr().println("zbin: row " + b.line() + ": " + b.message() + " (skipped)"))) {
            RecordedReading r;
            while ((r = src.next()) != null) {
                var d = engine.regrade(r);
                if (!r.isCheck()) plots.add(d.grading());
                for (var c : engine.observe(d)) plots.alarm(c);
            }
        }
        h.heading("The lot graded again under " + recipe.name() + " (from the stored readings)").monitor(engine.snapshot(rec.last()))
                .heading("Deviation").deviationHistogram(plots).heading("Loss").lossHistogram(plots).heading("Run chart").runChart(plots);
        h.write(out);
        PrintWriter o = spec.commandLine().getOut();
        o.printf(Locale.ROOT, "quality record of %s: %d parts, yield %s, %d alarm events, %d captures -> %s%n", what, parts,
                pct(parts == 0 ? Double.NaN : 100.0 * passed / parts), rec.alarms().size(), rec.captures().size(), out);
        return Main.EXIT_OK;
    }

    private static String pct(double v) { return Shown.of("%.2f %%", v); }
}
