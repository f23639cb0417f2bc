package net.zbin.app.report;

import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import net.zbin.core.BinTally;
import net.zbin.core.Grade;
import net.zbin.core.Recipe;
import net.zbin.core.Tuner;

/**
 * What a tune setting's passed parts are worth: each grade's parts times the grade's value (1 when not
 * given), in % of the parts finished. With every value 1 it is the yield; with a tight grade worth more,
 * a setting that moves parts from it to a wider grade is worth less, though its yield is the same.
 */
public final class Worth {
    private final Recipe recipe;
    private final Map<String, Double> values;

    public Worth(Recipe recipe, Map<String, Double> values) {
        this.recipe = recipe;
        this.values = values == null ? Map.of() : Map.copyOf(values);
    }

    public boolean weighted() { return !values.isEmpty(); }

    public double of(Tuner.Result x) {
        BinTally.Snapshot s = x.tally();
        if (s.parts() == 0) return Double.NaN;
        double sum = 0;
        for (Grade g : recipe.grades()) {
            long n = s.bins().stream().filter(b -> b.grade().equals(g.name())).mapToLong(BinTally.BinCount::count).sum();
            sum += n * values.getOrDefault(g.name(), 1.0);
        }
        return 100 * sum / s.parts();
    }

    public String describe() {
        if (values.isEmpty()) return "yield";
        StringBuilder b = new StringBuilder("value (");
        for (Grade g : recipe.grades()) b.append(b.length() > 7 ? ", " : "").append(g.name()).append(' ').append(values.getOrDefault(g.name(), 1.0));
        return b.append(" per part)").toString();
    }

    /** The tune table's columns: setting, parts, yield, value (when weighted), each grade, low, high, gate, other, retests, risks. */
    public List<String> columns() {
        List<String> c = new ArrayList<>(List.of("setting", "parts", "yield_pct"));
        if (weighted()) c.add("value_pct");
        for (Grade g : recipe.grades()) c.add("grade_" + g.name());
        c.addAll(List.of("low", "high", "gate", "other", "retests", "false_accept_pct", "false_reject_pct"));
        return c;
    }

    /** One result's cells in the columns after "setting". */
    public List<Object> cells(Tuner.Result x) {
        List<Object> c = new ArrayList<>();
        BinTally.Snapshot s = x.tally();
        c.add(s.parts());
        c.add(s.yieldPct());
        if (weighted()) c.add(of(x));
        long graded = 0;
        for (Grade g : recipe.grades()) {
            long n = count(s, g.name());
            graded += n;
            c.add(n);
        }
        long low = count(s, "low"), high = count(s, "high"), gate = count(s, "gate");
        c.add(low);
        c.add(high);
        c.add(gate);
        c.add(s.parts() - graded - low - high - gate);
        c.add(s.retests());
        c.add(x.falseAcceptPct());
        c.add(x.falseRejectPct());
        return c;
    }

    private static long count(BinTally.Snapshot s, String grade) {
        return s.bins().stream().filter(b -> b.grade().equals(grade)).mapToLong(BinTally.BinCount::count).sum();
    }
}
