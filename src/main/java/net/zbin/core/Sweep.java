package net.zbin.core;

import java.math.BigDecimal;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

/**
 * One recipe quantity swept over values, as an engineer types it:
 * {@code grade.J=3:7:0.5} (grade J's ± half-width in %, 3 to 7 in steps of 0.5), {@code grade.K.low=-12,-10,-8},
 * {@code grade.K.high=8:12:1}, {@code guard=0:0.5:0.05} (U in % of reading), {@code d_max=0.02:0.03:0.0025},
 * {@code q_min=20,30,40}, {@code esr_max=10m:50m:10m}, {@code nominal=99n:101n:0.5n}. Ranges include both ends.
 *
 * @param quantity what is varied
 * @param grade    the grade's name for grade quantities, else null
 * @param values   the values, in the quantity's unit
 */
public record Sweep(Quantity quantity, String grade, List<Double> values) {
    /** The quantities a sweep can vary, with the unit their values are read in. */
    public enum Quantity {
        GRADE_HALF_WIDTH(Unit.PERCENT), GRADE_LOW(Unit.PERCENT), GRADE_HIGH(Unit.PERCENT), GUARD(Unit.PERCENT),
        D_MAX(Unit.RATIO), Q_MIN(Unit.RATIO), ESR_MAX(Unit.OHM), NOMINAL(Unit.ANY);

        final Unit unit;

        Quantity(Unit unit) { this.unit = unit; }
    }

    /** At most this many values in one sweep. */
    public static final int MAX_VALUES = 10_000;

    private static final Pattern SPEC = Pattern.compile("(grade\\.([^.=]+)(?:\\.(low|high))?|guard|d_max|q_min|esr_max|nominal)=(.+)");

    public Sweep {
        values = List.copyOf(values);
        if (values.isEmpty()) throw new IllegalArgumentException("a sweep needs at least one value");
    }

    /**
     * @throws IllegalArgumentException with the spec and the forms that are understood
     */
    public static Sweep parse(String spec, PartType type) {
        Matcher m = SPEC.matcher(spec.trim());
        if (!m.matches())
            throw new IllegalArgumentException("'" + spec + "' is not a sweep; write QUANTITY=FROM:TO:STEP or QUANTITY=V1,V2,… with QUANTITY one of "
                    + "grade.NAME (± half-width %), grade.NAME.low, grade.NAME.high (%), guard (U %), d_max, q_min, esr_max (Ω), nominal");
        Quantity q;
        String grade = m.group(2);
        if (grade != null) q = m.group(3) == null ? Quantity.GRADE_HALF_WIDTH : m.group(3).equals("low") ? Quantity.GRADE_LOW : Quantity.GRADE_HIGH;
        else q = Quantity.valueOf(m.group(1).toUpperCase(Locale.ROOT));
        Unit unit = q == Quantity.NOMINAL ? Unit.of(type) : q.unit;
        return new Sweep(q, grade, values(m.group(4), unit, spec));
    }

    private static List<Double> values(String text, Unit unit, String spec) {
        List<Double> out = new ArrayList<>();
        String[] range = text.split(":");
        try {
            if (range.length == 3) {
                BigDecimal from = BigDecimal.valueOf(SiValue.parse(range[0], unit)), to = BigDecimal.valueOf(SiValue.parse(range[1], unit));
                BigDecimal step = BigDecimal.valueOf(SiValue.parse(range[2], unit));
                if (step.signum() <= 0) throw new IllegalArgumentException("the step must be > 0");
                if (from.compareTo(to) > 0) throw new IllegalArgumentException("FROM must not be above TO");
                for (BigDecimal v = from; v.compareTo(to) <= 0; v = v.add(step)) {
                    out.add(v.doubleValue());
                    if (out.size() > MAX_VALUES) throw new IllegalArgumentException("more than " + MAX_VALUES + " values");
                }
            } else if (range.length == 1) {
                for (String v : text.split(",")) out.add(SiValue.parse(v, unit));
            } else throw new IllegalArgumentException("a range is FROM:TO:STEP");
        } catch (IllegalArgumentException e) {
            throw new IllegalArgumentException("'" + spec + "': " + e.getMessage());
        }
        return out;
    }

    /** The label of one value for people: "grade.J=4.5". */
    public String label(double v) {
        String name = switch (quantity) {
            case GRADE_HALF_WIDTH -> "grade." + grade;
            case GRADE_LOW -> "grade." + grade + ".low";
            case GRADE_HIGH -> "grade." + grade + ".high";
            default -> quantity.name().toLowerCase(Locale.ROOT);
        };
        if (quantity == Quantity.NOMINAL) return name + "=" + SiValue.compact(v);
        return name + "=" + BigDecimal.valueOf(v).stripTrailingZeros().toPlainString();
    }

    /** Whether the quantity is one of the D/Q/ESR gates. */
    public boolean gate() {
        return quantity == Quantity.D_MAX || quantity == Quantity.Q_MIN || quantity == Quantity.ESR_MAX;
    }

    /** Whether the value changes only what {@link Grader}'s last, by-value step sees (limits, guard). */
    public boolean byValueOnly() {
        return quantity == Quantity.GRADE_HALF_WIDTH || quantity == Quantity.GRADE_LOW || quantity == Quantity.GRADE_HIGH
                || quantity == Quantity.GUARD;
    }

    /**
     * The recipe with this sweep's quantity set to {@code v}: {@link #applyAll} with one sweep.
     *
     * @throws SpecException when the result is not a valid recipe (e.g. grades that no longer nest)
     */
    public Recipe apply(Recipe r, double v) { return applyAll(r, List.of(this), List.of(v)); }

    /**
     * The recipe as an engineer would edit the file to these settings, validated once with every setting in
     * place (so a pair of settings that is valid together is never refused for an intermediate state, and the
     * order of the sweeps does not matter). A new nominal re-resolves each grade as its file states it (a
     * letter again, values as values, percent as percent); a swept grade edge is in percent of the new nominal,
     * the grade's other edge kept where the new nominal puts it.
     *
     * @throws SpecException when the result is not a valid recipe
     */
    public static Recipe applyAll(Recipe r, List<Sweep> sweeps, List<Double> values) {
        if (sweeps.size() != values.size()) throw new IllegalArgumentException("one value per sweep");
        double nominal = r.nominal();
        for (int i = 0; i < sweeps.size(); i++) if (sweeps.get(i).quantity == Quantity.NOMINAL) nominal = values.get(i);
        if (!(nominal > 0) || !Double.isFinite(nominal)) throw new SpecException("nominal", "must be > 0 (was " + nominal + ")");
        List<Grade> grades = new ArrayList<>();
        for (Grade g : r.grades()) grades.add(nominal == r.nominal() ? g : g.atNominal(r.partType(), nominal));
        GuardBand guard = r.guard();
        Gates g = r.gates();
        for (int k = 0; k < sweeps.size(); k++) {
            Sweep sw = sweeps.get(k);
            double v = values.get(k);
            switch (sw.quantity) {
                case GRADE_HALF_WIDTH, GRADE_LOW, GRADE_HIGH -> {
                    int i = indexOf(r, sw.grade);
                    Grade old = grades.get(i);
                    double lo = sw.quantity == Quantity.GRADE_HIGH ? old.lowPct() : sw.quantity == Quantity.GRADE_LOW ? v : -v;
                    double hi = sw.quantity == Quantity.GRADE_LOW ? old.highPct() : v;
                    grades.set(i, new Grade(old.name(), old.bin(), lo, hi));
                }
                case GUARD -> guard = new GuardBand(v, true, Math.min(v, guard.repeatabilityPct())); // the repeatability part kept, within U
                case D_MAX -> g = new Gates(v, g.qMin(), g.esrMaxOhm(), g.thetaMinDeg(), g.thetaMaxDeg());
                case Q_MIN -> g = new Gates(g.dMax(), v, g.esrMaxOhm(), g.thetaMinDeg(), g.thetaMaxDeg());
                case ESR_MAX -> g = new Gates(g.dMax(), g.qMin(), v, g.thetaMinDeg(), g.thetaMaxDeg());
                case NOMINAL -> { }
            }
        }
        return r.toBuilder().nominal(nominal).grades(grades).guard(guard).gates(g).build();
    }

    /** Refuses a sweep that names something the recipe does not have (a grade), naming what it has. */
    public void check(Recipe r) {
        if (grade != null) indexOf(r, grade);
    }

    private static int indexOf(Recipe r, String name) {
        for (int i = 0; i < r.grades().size(); i++) if (r.grades().get(i).name().equals(name)) return i;
        throw new SpecException("grades", "no grade '" + name + "' in recipe " + r.name() + " (it has "
                + String.join(", ", r.grades().stream().map(Grade::name).toList()) + ")");
    }
}
