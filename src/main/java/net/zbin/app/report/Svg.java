package net.zbin.app.report;

import java.util.Locale;

/**
 * A small SVG writer for the report's plots: a plot area with linear axes, and the few marks the plots
 * need (bars, polylines with markers, vertical limit lines, labels). Text is escaped; every mark that
 * carries meaning also has a dash pattern, a marker shape or a label, so colour is never the only cue.
 */
public final class Svg {
    private final StringBuilder b = new StringBuilder();
    private final double w, h, left = 70, right = 20, top = 30, bottom = 50;
    private final double x0, x1, y0, y1;
    private final java.util.function.DoubleFunction<String> xText;

    /** A plot of width × height pixels over data x0..x1, y0..y1, with a title; axis labels should carry their unit. */
    public Svg(double w, double h, double x0, double x1, double y0, double y1, String title, String xLabel, String yLabel) {
        this(w, h, x0, x1, y0, y1, title, xLabel, yLabel, Svg::num);
    }

    /** The same with the x ticks' text from {@code xText} (e.g. SI prefixes for a nominal in farads). */
    public Svg(double w, double h, double x0, double x1, double y0, double y1, String title, String xLabel, String yLabel,
               java.util.function.DoubleFunction<String> xText) {
        this.xText = xText;
        this.w = w;
        this.h = h;
        this.x0 = x0;
        this.x1 = x1 > x0 ? x1 : x0 + 1;
        this.y0 = y0;
        this.y1 = y1 > y0 ? y1 : y0 + 1;
        b.append(String.format(Locale.ROOT, "<svg width=\"%.0f\" height=\"%.0f\" viewBox=\"0 0 %.0f %.0f\" role=\"img\" aria-label=\"%s\">",
                w, h, w, h, esc(title)));
        b.append("<rect width=\"100%\" height=\"100%\" fill=\"#ffffff\"/>");
        text(w / 2, 18, title, "middle", 15, "bold");
        text((left + w - right) / 2, h - 10, xLabel, "middle", 12, "normal");
        b.append(String.format(Locale.ROOT, "<text x=\"14\" y=\"%.1f\" font-size=\"12\" text-anchor=\"middle\" transform=\"rotate(-90 14 %.1f)\">%s</text>",
                (top + h - bottom) / 2, (top + h - bottom) / 2, esc(yLabel)));
        axes();
    }

    public double px(double x) { return left + (x - x0) / (x1 - x0) * (w - left - right); }

    public double py(double y) { return h - bottom - (y - y0) / (y1 - y0) * (h - top - bottom); }

    private void axes() {
        b.append(String.format(Locale.ROOT, "<g stroke=\"#222\" stroke-width=\"1\"><line x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\"/><line x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\"/></g>",
                left, h - bottom, w - right, h - bottom, left, top, left, h - bottom));
        for (double x : ticks(x0, x1)) text(px(x), h - bottom + 16, xText.apply(x), "middle", 11, "normal");
        for (double y : ticks(y0, y1)) {
            text(left - 6, py(y) + 4, num(y), "end", 11, "normal");
            b.append(String.format(Locale.ROOT, "<line x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\" stroke=\"#ddd\"/>", left, py(y), w - right, py(y)));
        }
    }

    /**
     * Round tick values within [a, b]: multiples of a step of 1, 2 or 5 × 10ⁿ giving at most 9 ticks, so 0 is a tick
     * whenever the range holds it, and so is any round value (a nominal of 4.7 pF on a 0.1 pF step).
     */
    static double[] ticks(double a, double b) {
        if (!(b > a)) return new double[] {a};
        double raw = (b - a) / 5, mag = Math.pow(10, Math.floor(Math.log10(raw))), step = mag;
        for (double m : new double[] {1, 2, 5, 10}) {
            step = m * mag;
            if ((b - a) / step <= 8) break;
        }
        java.math.BigDecimal st = new java.math.BigDecimal(step).round(new java.math.MathContext(1));
        java.math.BigDecimal first = new java.math.BigDecimal(Math.ceil(a / step - 1e-9)).multiply(st);
        java.util.List<Double> out = new java.util.ArrayList<>();
        for (java.math.BigDecimal v = first; v.doubleValue() <= b * (1 + Math.signum(b) * 1e-12) + 1e-300; v = v.add(st)) out.add(v.doubleValue());
        return out.stream().mapToDouble(Double::doubleValue).toArray();
    }

    /** A horizontal line at y with a label at its right end (a target). */
    public Svg hline(double y, String label, String stroke, String dash) {
        if (y < y0 || y > y1) return this;
        b.append(String.format(Locale.ROOT, "<line x1=\"%.1f\" y1=\"%.2f\" x2=\"%.1f\" y2=\"%.2f\" stroke=\"%s\" stroke-width=\"1.5\"%s/>",
                left, py(y), w - right, py(y), stroke, dash == null ? "" : " stroke-dasharray=\"" + dash + "\""));
        text(left + 6, py(y) - 4, label, "start", 10, "normal");
        return this;
    }

    /** A bar from y0 up to y over [xa, xb]. */
    public Svg bar(double xa, double xb, double y, String fill) {
        double top = py(y), bottom = py(y0);
        b.append(String.format(Locale.ROOT, "<rect x=\"%.2f\" y=\"%.2f\" width=\"%.2f\" height=\"%.2f\" fill=\"%s\" stroke=\"#333\" stroke-width=\"0.3\"/>",
                px(xa), top, Math.max(0.5, px(xb) - px(xa)), Math.max(0, bottom - top), fill));
        return this;
    }

    /** A vertical line at x with a label at its top; dashed lines tell guard limits from limits without colour. */
    public Svg vline(double x, String label, String stroke, String dash, int labelRow) {
        if (x < x0 || x > x1) return this;
        b.append(String.format(Locale.ROOT, "<line x1=\"%.2f\" y1=\"%.1f\" x2=\"%.2f\" y2=\"%.1f\" stroke=\"%s\" stroke-width=\"1.5\"%s/>",
                px(x), top, px(x), h - bottom, stroke, dash == null ? "" : " stroke-dasharray=\"" + dash + "\""));
        text(px(x) + 3, top + 12 + 12 * labelRow, label, "start", 10, "normal");
        return this;
    }

    /** A line through points with a marker shape at each ("circle", "square", "triangle"), and its legend entry. */
    public Svg series(double[] xs, double[] ys, String stroke, String dash, String marker, String legend, int legendRow) {
        StringBuilder pts = new StringBuilder();
        for (int i = 0; i < xs.length; i++) {
            if (!Double.isFinite(ys[i])) continue;
            pts.append(String.format(Locale.ROOT, "%.2f,%.2f ", px(xs[i]), py(ys[i])));
        }
        b.append(String.format(Locale.ROOT, "<polyline fill=\"none\" stroke=\"%s\" stroke-width=\"1.8\"%s points=\"%s\"/>", stroke,
                dash == null ? "" : " stroke-dasharray=\"" + dash + "\"", pts.toString().trim()));
        for (int i = 0; i < xs.length; i++) if (Double.isFinite(ys[i])) marker(px(xs[i]), py(ys[i]), marker, stroke, 3.5);
        double lx = w - right - 190, ly = top + 14 + 16 * legendRow;
        b.append(String.format(Locale.ROOT, "<line x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\" stroke=\"%s\" stroke-width=\"1.8\"%s/>",
                lx, ly - 4, lx + 26, ly - 4, stroke, dash == null ? "" : " stroke-dasharray=\"" + dash + "\""));
        marker(lx + 13, ly - 4, marker, stroke, 3.5);
        text(lx + 32, ly, legend, "start", 11, "normal");
        return this;
    }

    /** Points without a line (a run chart). */
    public Svg dots(double[] xs, double[] ys, String fill) {
        for (int i = 0; i < xs.length; i++)
            if (Double.isFinite(ys[i]))
                b.append(String.format(Locale.ROOT, "<circle cx=\"%.1f\" cy=\"%.1f\" r=\"1.3\" fill=\"%s\"/>", px(xs[i]), py(Math.max(y0, Math.min(y1, ys[i]))), fill));
        return this;
    }

    /** A labelled marker (e.g. an alarm point) at data x, y. */
    public Svg flag(double x, double y, String label, String stroke) {
        marker(px(x), py(y), "triangle", stroke, 6);
        text(px(x) + 7, py(y) - 6, label, "start", 10, "bold");
        return this;
    }

    private void marker(double cx, double cy, String shape, String stroke, double r) {
        switch (shape) {
            case "square" -> b.append(String.format(Locale.ROOT, "<rect x=\"%.1f\" y=\"%.1f\" width=\"%.1f\" height=\"%.1f\" fill=\"%s\"/>", cx - r, cy - r, 2 * r, 2 * r, stroke));
            case "triangle" -> b.append(String.format(Locale.ROOT, "<polygon points=\"%.1f,%.1f %.1f,%.1f %.1f,%.1f\" fill=\"%s\"/>",
                    cx, cy - r, cx - r, cy + r, cx + r, cy + r, stroke));
            default -> b.append(String.format(Locale.ROOT, "<circle cx=\"%.1f\" cy=\"%.1f\" r=\"%.1f\" fill=\"%s\"/>", cx, cy, r, stroke));
        }
    }

    private void text(double x, double y, String t, String anchor, int size, String weight) {
        b.append(String.format(Locale.ROOT, "<text x=\"%.1f\" y=\"%.1f\" font-size=\"%d\" font-weight=\"%s\" text-anchor=\"%s\" font-family=\"sans-serif\">%s</text>",
                x, y, size, weight, anchor, esc(t)));
    }

    static String num(double v) {
        double a = Math.abs(v);
        if (a == 0) return "0";
        return a >= 1000 || a < 0.01 ? String.format(Locale.ROOT, "%.3g", v) : String.format(Locale.ROOT, "%.4g", v);
    }

    /** XML text escape. */
    public static String esc(String s) {
        if (s == null) return "";
        StringBuilder o = new StringBuilder(s.length());
        for (char c : s.toCharArray())
            switch (c) {
                case '<' -> o.append("&lt;");
                case '>' -> o.append("&gt;");
                case '&' -> o.append("&amp;");
                case '"' -> o.append("&quot;");
                default -> o.append(c);
            }
        return o.toString();
    }

    @Override
    public String toString() { return b + "</svg>"; }
}
