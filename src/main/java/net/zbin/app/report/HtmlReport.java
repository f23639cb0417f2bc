package net.zbin.app.report;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Instant;
import java.util.List;
import java.util.Locale;
import net.zbin.core.AlarmCode;
import net.zbin.core.BinTally;
import net.zbin.core.Grade;
import net.zbin.core.GradingMode;
import net.zbin.core.LineMonitor;
import net.zbin.core.Recipe;
import net.zbin.core.Tuner;

/**
 * One self-contained HTML file (inline CSS and SVG, no script, no address of anything outside it) with the
 * lot's plots and summary, readable on screen and printable. Limits are solid lines and guard limits
 * dashed, each with its label; curves differ by dash pattern and marker shape as well as colour.
 */
public final class HtmlReport {
    private final StringBuilder b = new StringBuilder();

    public HtmlReport(String title) {
        b.append("<!DOCTYPE html><html lang=\"en\"><head><meta charset=\"utf-8\"><title>").append(Svg.esc(title)).append("</title><style>")
                .append("body{font-family:sans-serif;margin:24px;color:#111;max-width:1100px}h1{font-size:22px}h2{font-size:17px;margin-top:28px}")
                .append("table{border-collapse:collapse;margin:8px 0}td,th{border:1px solid #999;padding:3px 8px;text-align:right}")
                .append("th{background:#eee}td.l,th.l{text-align:left}.note{color:#444;font-size:13px}svg{display:block;margin:8px 0}")
                .append("@media print{body{margin:0}h2{page-break-before:auto}svg{page-break-inside:avoid}}</style></head><body>")
                .append("<h1>").append(Svg.esc(title)).append("</h1>");
    }

    public HtmlReport para(String text) {
        b.append("<p class=\"note\">").append(Svg.esc(text)).append("</p>");
        return this;
    }

    public HtmlReport heading(String text) {
        b.append("<h2>").append(Svg.esc(text)).append("</h2>");
        return this;
    }

    /** The bins and reasons of a tally. */
    public HtmlReport summary(Recipe r, BinTally.Snapshot s) {
        b.append(String.format(Locale.ROOT, "<table><tr><th class=\"l\">recipe</th><td class=\"l\">%s</td></tr><tr><th class=\"l\">parts finished</th><td>%d</td></tr>"
                        + "<tr><th class=\"l\">yield</th><td>%s</td></tr><tr><th class=\"l\">retests</th><td>%d</td></tr><tr><th class=\"l\">fixture checks</th><td>%d</td></tr></table>",
                Svg.esc(r.name()), s.parts(), Shown.of("%.2f %%", s.yieldPct()), s.retests(), s.checks()));
        b.append("<table><tr><th>bin</th><th class=\"l\">grade</th><th class=\"l\">verdict</th><th>parts</th><th>share</th></tr>");
        for (BinTally.BinCount c : s.bins())
            b.append(String.format(Locale.ROOT, "<tr><td>%d</td><td class=\"l\">%s</td><td class=\"l\">%s</td><td>%d</td><td>%.2f %%</td></tr>",
                    c.bin(), Svg.esc(c.grade()), c.verdict().key(), c.count(), c.pct()));
        b.append("</table><table><tr><th class=\"l\">reason (final decision)</th><th>parts</th></tr>");
        s.reasons().forEach((k, v) -> b.append("<tr><td class=\"l\">").append(Svg.esc(k.code())).append("</td><td>").append(v).append("</td></tr>"));
        b.append("</table>");
        return this;
    }

    public HtmlReport monitor(LineMonitor.Snapshot m) {
        b.append(String.format(Locale.ROOT, "<table><tr><th class=\"l\">deviation mean</th><td>%s</td></tr><tr><th class=\"l\">σ</th><td>%s</td></tr>"
                        + "<tr><th class=\"l\">Cp / Cpk</th><td>%s / %s</td></tr><tr><th class=\"l\">value drift</th><td class=\"l\">%s</td></tr>"
                        + "<tr><th class=\"l\">%s drift</th><td class=\"l\">%s</td></tr></table>",
                Shown.of("%+.4f %%", m.devMeanPct()), Shown.of("%.4f %%", m.devSigmaPct()), Shown.of("%.3g", m.cp()), Shown.of("%.3g", m.cpk()), m.value().learning() ? "learning" : m.value().alarm() ? "ALARM" : "in control",
                Svg.esc(m.lossName()), m.loss().learning() ? "learning" : m.loss().alarm() ? "ALARM" : "in control"));
        if (!m.causeText().isEmpty()) para("Population check: " + m.causeText());
        return this;
    }

    /** Histogram of the deviation with the grade limits (solid) and guarded acceptance limits (dashed). */
    public HtmlReport deviationHistogram(LotPlots p) {
        long max = 1;
        for (long c : p.devCounts) max = Math.max(max, c);
        Svg s = new Svg(1000, 360, p.devLo, p.devHi, 0, max * 1.1, "Graded deviation from nominal (" + p.recipe.primaryParam().label() + ")",
                "deviation, %", "parts");
        double w = (p.devHi - p.devLo) / LotPlots.BINS;
        for (int i = 0; i < LotPlots.BINS; i++) if (p.devCounts[i] > 0) s.bar(p.devLo + i * w, p.devLo + (i + 1) * w, p.devCounts[i], "#7aa6d6");
        int row = 0;
        for (Grade g : p.recipe.grades()) {
            s.vline(g.lowPct(), g.name() + " " + Svg.num(g.lowPct()) + " %", "#b03030", null, row % 4);
            s.vline(g.highPct(), g.name() + " " + Svg.num(g.highPct()) + " %", "#b03030", null, row % 4);
            if (p.recipe.guard().widthPct() > 0) {
                s.vline(g.acceptLowPct(p.recipe.guard()), "guard", "#333333", "5,4", (row + 2) % 4);
                s.vline(g.acceptHighPct(p.recipe.guard()), "guard", "#333333", "5,4", (row + 2) % 4);
            }
            row++;
        }
        b.append(s);
        para(String.format(Locale.ROOT, "Solid lines: grade limits; dashed: guarded acceptance limits. %d parts below and %d above the range shown.",
                p.devUnder, p.devOver));
        return this;
    }

    public HtmlReport lossHistogram(LotPlots p) {
        long max = 1;
        for (long c : p.lossCounts) max = Math.max(max, c);
        Svg s = new Svg(1000, 320, 0, p.lossHi, 0, max * 1.1, "Loss: " + p.lossName(), p.lossName(), "parts");
        double w = p.lossHi / LotPlots.BINS;
        for (int i = 0; i < LotPlots.BINS; i++) if (p.lossCounts[i] > 0) s.bar(i * w, (i + 1) * w, p.lossCounts[i], "#9cc29c");
        double lim = p.lossLimit();
        if (Double.isFinite(lim)) s.vline(lim, "gate " + Svg.num(lim), "#b03030", null, 0);
        b.append(s);
        para(p.lossOver + " parts above the range shown.");
        return this;
    }

    /** The deviation over the lot's sequence, with the monitor's alarm points. */
    public HtmlReport runChart(LotPlots p) {
        double[] xs = p.run.stream().mapToDouble(a -> a[0]).toArray(), ys = p.run.stream().mapToDouble(a -> a[1]).toArray();
        double xmax = Math.max(1, p.seen);
        Svg s = new Svg(1000, 360, 0, xmax, p.devLo, p.devHi, "Deviation over the lot, with the monitor's alarms", "graded part", "deviation, %");
        s.dots(xs, ys, "#3b6ea5");
        for (Object[] a : p.alarms) {
            AlarmCode.Change c = (AlarmCode.Change) a[1];
            if (c.active()) s.flag((long) a[0], p.devHi - (p.devHi - p.devLo) * 0.05, c.code().code(), "#b03030");
        }
        b.append(s);
        para((p.stride == 1 ? "Every graded part shown" : "One graded part in " + p.stride + " shown")
                + ". Triangles mark where a monitor alarm was raised.");
        return this;
    }

    /**
     * Yield (or value) and the two risks against the first sweep's setting, one line per value of the second sweep
     * (named in the legend), the recommended setting and the false-accept target marked.
     */
    public HtmlReport tuneCurves(List<Tuner.Result> results, List<net.zbin.core.Sweep> sweeps, Tuner.Result pick, Double target, String partUnit) {
        List<Tuner.Result> ok = results.stream().filter(Tuner.Result::valid).toList();
        if (ok.isEmpty()) return para("No valid setting to plot.");
        net.zbin.core.Sweep first = sweeps.get(0);
        java.util.Map<Double, List<Tuner.Result>> bySecond = new java.util.TreeMap<>();
        for (Tuner.Result r : ok) bySecond.computeIfAbsent(r.values().size() > 1 ? r.values().get(1) : 0.0, k -> new java.util.ArrayList<>()).add(r);
        double xmin = ok.stream().mapToDouble(r -> r.values().get(0)).min().orElse(0), xmax = ok.stream().mapToDouble(r -> r.values().get(0)).max().orElse(1);
        double ymin = ok.stream().mapToDouble(r -> r.tally().yieldPct()).filter(Double::isFinite).min().orElse(0);
        double rmax = ok.stream().mapToDouble(r -> Math.max(r.falseAcceptPct(), r.falseRejectPct())).filter(Double::isFinite).max().orElse(1);
        if (target != null) rmax = Math.max(rmax, target);
        String xName = axisName(first, partUnit);
        java.util.function.DoubleFunction<String> xText = first.quantity() == net.zbin.core.Sweep.Quantity.NOMINAL
                ? v -> net.zbin.core.SiValue.compact(v) : Svg::num;
        Svg y = new Svg(1000, 340, xmin, xmax, Math.max(0, Math.floor(ymin - 1)), 100, "Yield against the setting", xName, "yield, % of parts finished", xText);
        Svg risk = new Svg(1000, 340, xmin, xmax, 0, rmax > 0 ? rmax * 1.15 : 1, "Risk against the setting (JCGM 106 global risk)", xName,
                "risk, % of parts finished", xText);
        String[] colours = {"#1f5fa8", "#b05a00", "#2f7d32", "#7b2d8b"};
        String[] dashes = {null, "6,3", "2,3", "8,3,2,3"};
        String[] markers = {"circle", "square", "triangle", "circle"};
        int i = 0;
        for (var e : bySecond.entrySet()) {
            double[] xs = e.getValue().stream().mapToDouble(r -> r.values().get(0)).toArray();
            String tag = sweeps.size() > 1 ? " (" + sweeps.get(1).label(e.getKey()) + ")" : "";
            y.series(xs, e.getValue().stream().mapToDouble(r -> r.tally().yieldPct()).toArray(), colours[i % 4], dashes[i % 4], markers[i % 4],
                    "yield" + tag, i);
            risk.series(xs, e.getValue().stream().mapToDouble(Tuner.Result::falseAcceptPct).toArray(), colours[i % 4], null, "triangle",
                    "false accept" + tag, 2 * i);
            risk.series(xs, e.getValue().stream().mapToDouble(Tuner.Result::falseRejectPct).toArray(), colours[i % 4], "6,3", "square",
                    "false reject" + tag, 2 * i + 1);
            i++;
        }
        if (pick != null) {
            y.vline(pick.values().get(0), "recommended: " + pick.label(), "#c62828", "4,2", 0);
            risk.vline(pick.values().get(0), "recommended: " + pick.label(), "#c62828", "4,2", 0);
        }
        if (target != null) risk.hline(target, "false-accept target " + net.zbin.core.SiValue.plain(target) + " %", "#c62828", "2,2");
        b.append(y).append(risk);
        return this;
    }

    /** The x axis of a sweep, with its unit. */
    static String axisName(net.zbin.core.Sweep s, String partUnit) {
        String label = s.label(0);
        String name = label.substring(0, label.indexOf('='));
        return name + switch (s.quantity()) {
            case GRADE_HALF_WIDTH -> " (± half-width), % of nominal";
            case GRADE_LOW, GRADE_HIGH -> ", % of nominal";
            case GUARD -> " (U), % of reading";
            case D_MAX -> " (D, dimensionless)";
            case Q_MIN -> " (Q, dimensionless)";
            case ESR_MAX -> ", Ω";
            case NOMINAL -> ", " + partUnit;
        };
    }

    /** Every setting with the counts the command line's table shows: parts, yield, each grade, low, high, gate, other, retests, risks. */
    public HtmlReport tuneTable(Worth worth, List<Tuner.Result> results) {
        List<String> cols = worth.columns();
        b.append("<table><tr>");
        for (String c : cols) b.append(c.equals("setting") ? "<th class=\"l\">" : "<th>").append(Svg.esc(c.replace("grade_", "").replace("_pct", " %")
                .replace('_', ' '))).append("</th>");
        b.append("</tr>");
        for (Tuner.Result r : results) {
            b.append("<tr><td class=\"l\">").append(Svg.esc(r.label())).append("</td>");
            if (!r.valid()) {
                b.append("<td colspan=\"").append(cols.size() - 1).append("\" class=\"l\">not a valid recipe: ").append(Svg.esc(r.problem())).append("</td></tr>");
                continue;
            }
            for (Object v : worth.cells(r))
                b.append("<td>").append(v instanceof Double d ? Shown.of("%.4f", d) : Svg.esc(String.valueOf(v))).append("</td>");
            b.append("</tr>");
        }
        b.append("</table>");
        return this;
    }

    /** A plain table; the first {@code leftColumns} columns are text (left-aligned), the others figures. */
    public HtmlReport table(List<String> headers, List<List<String>> rows, int leftColumns) {
        b.append("<table><tr>");
        for (int i = 0; i < headers.size(); i++) b.append(i < leftColumns ? "<th class=\"l\">" : "<th>").append(Svg.esc(headers.get(i))).append("</th>");
        b.append("</tr>");
        for (List<String> r : rows) {
            b.append("<tr>");
            for (int i = 0; i < r.size(); i++) b.append(i < leftColumns ? "<td class=\"l\">" : "<td>").append(Svg.esc(r.get(i))).append("</td>");
            b.append("</tr>");
        }
        b.append("</table>");
        return this;
    }

    public void write(Path file) throws IOException {
        b.append("<p class=\"note\">Written by zbin at ").append(Instant.now()).append(".</p></body></html>\n");
        Files.writeString(file, b, StandardCharsets.UTF_8);
    }

    /** Whether a recipe's grades are drawn as concentric windows. */
    static boolean concentric(Recipe r) { return r.mode() == GradingMode.CONCENTRIC; }
}
