package net.zbin.app;

import com.fasterxml.jackson.databind.node.ObjectNode;
import java.io.IOException;
import java.io.PrintWriter;
import java.nio.file.Path;
import java.util.Locale;
import java.util.concurrent.Callable;
import java.util.ArrayList;
import java.util.List;
import net.zbin.app.report.Shown;
import net.zbin.core.AlarmCode;
import net.zbin.core.BinTally;
import net.zbin.core.Decision;
import net.zbin.core.Grading;
import net.zbin.core.LineEngine;
import net.zbin.core.LineMonitor;
import net.zbin.io.MonitorJson;
import net.zbin.core.Recipe;
import net.zbin.core.RecordedReading;
import net.zbin.io.Json;
import net.zbin.io.TallyJson;
import net.zbin.io.ReadingSource;
import net.zbin.io.RecipeLoader;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;
import picocli.CommandLine.Spec;
import picocli.CommandLine.Model.CommandSpec;

/** {@code zbin replay}: grade a recorded or simulated lot again under a recipe, streaming. */
@Command(name = "replay", mixinStandardHelpOptions = true, sortOptions = false,
        description = {"Grade a recorded or simulated lot under a recipe and summarise the bins.",
                "Input: a CSV whose header has at least freq_hz,r_ohm,x_ohm (a zbin record log works as is).",
                "The file is streamed: memory use does not grow with its size. Bad rows are reported by line",
                "number and skipped (or, with --strict, stop the run with exit code 2)."})
public final class ReplayCommand implements Callable<Integer> {
    @Option(names = "--recipe", required = true, paramLabel = "FILE", description = "recipe to grade with")
    Path recipeFile;
    @Option(names = "--in", paramLabel = "FILE.csv", description = "readings or record log (or --db with --line and --lot)")
    Path in;
    @Option(names = "--json", description = "print the summary as JSON")
    boolean json;
    @Option(names = "--strict", description = "stop at the first bad row (exit 2)")
    boolean strict;
    @picocli.CommandLine.Mixin
    ReadOptions reading;
    @Option(names = "--max-errors-shown", paramLabel = "N", defaultValue = "20", description = "bad rows listed before only counting (default ${DEFAULT-VALUE})")
    int maxShown;

    @Spec
    CommandSpec spec;

    @Override
    public Integer call() throws Exception {
        Recipe recipe = reading.forLine(RecipeLoader.load(recipeFile));
        PrintWriter err = spec.commandLine().getErr();
        BinTally tally = new BinTally();
        // The line's engine, fed the same decisions in the same order as it was live (lots and all): the same bins,
        // figures and alarm points.
        LineEngine engine = reading.engine(recipe);
        List<AlarmPoint> points = new ArrayList<>();
        ReadOptions.folderOf("--report", reading.report);
        net.zbin.app.report.LotPlots plots = reading.report == null ? null : new net.zbin.app.report.LotPlots(recipe);
        RowProgress bar = reading.progress(err, in);
        long[] badRows = {0};
        ReadingSource.BadRow[] firstBad = {null};
        try (ReadingSource src = reading.open(in, b -> {
            // with --strict the first bad row ends the run and is reported once, as what stopped it
            if (!strict && badRows[0] < maxShown) err.println("zbin: " + reading.inputName(in) + ": line " + b.line() + ": " + b.message() + " (skipped)");
            badRows[0]++;
            if (firstBad[0] == null) firstBad[0] = b;
        })) {
            RecordedReading row;
            while ((row = src.next()) != null) {
                if (strict && firstBad[0] != null) break;
                Decision d = engine.regrade(row);
                Grading g = d.grading();
                tally.add(g, !row.isCheck());
                if (plots != null && !row.isCheck()) plots.add(g);
                for (AlarmCode.Change c : engine.observe(d)) {
                    points.add(new AlarmPoint(row.line(), d.lot(), c));
                    if (plots != null) plots.alarm(c);
                }
                if (bar != null) bar.row();
            }
            if (bar != null) bar.done();
        } catch (IOException e) {
            throw new UsageException(e.getMessage());
        }
        if (strict && firstBad[0] != null)
            throw new UsageException(reading.inputName(in) + ": line " + firstBad[0].line() + ": " + firstBad[0].message() + " (--strict)");
        if (badRows[0] > maxShown) err.println("zbin: " + reading.inputName(in) + ": " + badRows[0] + " bad rows in all (skipped)");
        BinTally.Snapshot s = tally.snapshot();
        LineMonitor.Snapshot m = engine.snapshot(java.time.Instant.now());
        PrintWriter out = spec.commandLine().getOut();
        if (json) {
            ObjectNode n = toJson(s, badRows[0]);
            n.set("monitor", MonitorJson.encode(m));
            var arr = n.putArray("alarm_points");
            for (AlarmPoint p : points)
                arr.addObject().put("line", p.line()).put("lot", p.lot()).put("code", p.change().code().code()).put("active", p.change().active())
                        .put("message", p.change().message());
            out.println(Json.mapper().writerWithDefaultPrettyPrinter().writeValueAsString(n));
        } else {
            printTable(out, s, recipe, badRows[0]);
            printMonitor(out, m, points);
        }
        if (plots != null) {
            new net.zbin.app.report.HtmlReport("zbin replay: " + recipe.name() + " on " + (in != null ? in.getFileName().toString() : reading.inputName(in)))
                    .para("Recipe " + recipe.name() + ", input " + (in != null ? in.getFileName().toString() : reading.inputName(in)) + ".").heading("Summary").summary(recipe, s)
                    .heading("Line monitor").monitor(m).heading("Deviation").deviationHistogram(plots).heading("Loss").lossHistogram(plots)
                    .heading("Run chart").runChart(plots).write(reading.report);
            if (!json) out.println("  report: " + reading.report);
        }
        return Main.EXIT_OK;
    }

    /** An alarm raised or cleared at a line of the input, in a lot ("" when the input names none). */
    record AlarmPoint(long line, String lot, AlarmCode.Change change) {}

    static void printMonitor(PrintWriter out, LineMonitor.Snapshot m, List<AlarmPoint> points) {
        MonitorText.figures(out, m);
        if (points.isEmpty()) out.println("    alarms: none would have fired");
        else for (AlarmPoint p : points)
            out.printf(Locale.ROOT, "    line %d%s: %s %s — %s%n", p.line(), p.lot().isEmpty() ? "" : " (lot " + p.lot() + ")",
                    p.change().code().code(), p.change().active() ? "raised" : "cleared", p.change().message());
    }

    static ObjectNode toJson(BinTally.Snapshot s, long skipped) {
        ObjectNode n = Json.object();
        n.put("total", s.parts());
        TallyJson.put(n, s);
        n.put("skipped_rows", skipped);
        return n;
    }

    static void printTable(PrintWriter out, BinTally.Snapshot s, Recipe recipe, long skipped) {
        out.printf(Locale.ROOT, "recipe %s: %d parts finished, yield %s (%d presentations: %d parts + %d retests)%s%s%n",
                recipe.name(), s.parts(), Shown.of("%.2f %%", s.yieldPct()), s.presentations(), s.parts(), s.retests(),
                skipped > 0 ? ", " + skipped + " rows skipped" : "",
                s.checks() > 0 ? ", " + s.checks() + " fixture-check rows not graded" : "");
        out.printf(Locale.ROOT, "  %4s  %-10s %-7s %10s %8s%n", "bin", "grade", "verdict", "parts", "share");
        for (BinTally.BinCount b : s.bins())
            out.printf(Locale.ROOT, "  %4d  %-10s %-7s %10d %7.2f %%%n", b.bin(), b.grade(), b.verdict().key(), b.count(), b.pct());
        out.println("  reasons (final decision per part):");
        s.reasons().forEach((k, v) -> out.printf(Locale.ROOT, "    %-22s %10d%n", k.code(), v));
        if (!s.retestReasons().isEmpty()) {
            out.println("  retests:");
            s.retestReasons().forEach((k, v) -> out.printf(Locale.ROOT, "    %-22s %10d%n", k.code(), v));
        }
    }
}
