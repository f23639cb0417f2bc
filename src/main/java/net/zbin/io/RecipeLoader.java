package net.zbin.io;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import net.zbin.core.ContactCheck;
import net.zbin.core.Gates;
import net.zbin.core.Grade;
import net.zbin.core.GradingMode;
import net.zbin.core.GuardBand;
import net.zbin.core.MarkingCode;
import net.zbin.core.ModelPolicy;
import net.zbin.core.MonitorSettings;
import net.zbin.core.PartType;
import net.zbin.core.PhaseWindow;
import net.zbin.core.SiValue;
import net.zbin.core.Unit;
import net.zbin.core.PrimaryParam;
import net.zbin.core.Recipe;
import net.zbin.core.Remeasure;
import net.zbin.core.RejectBins;
import net.zbin.core.RetestPolicy;
import net.zbin.core.TestConditions;
import net.zbin.core.TestStep;
import net.zbin.core.ToleranceCode;

/** Loads a recipe YAML file into a validated {@link Recipe}; every refusal names file and key. */
public final class RecipeLoader {
    private RecipeLoader() {}

    public static Recipe load(Path file) throws ConfigException {
        return parse(Yaml.read(file));
    }

    static Recipe parse(SpecNode n) throws ConfigException {
        String name = n.text("recipe");
        n.optText("description", "");
        PartType type = n.build("part", () -> PartType.parse(n.text("part")));
        double nominal = value(n, "nominal", type);

        TestConditions test = test(n);

        SpecNode m = n.child("model");
        ModelPolicy model = m.build(null, () -> new ModelPolicy(ModelPolicy.Mode.parse(m.optText("mode", "auto")),
                m.optNumber("series_below_ohm", 100, Unit.OHM), m.optNumber("parallel_above_ohm", 10_000, Unit.OHM)));
        m.finish();

        PrimaryParam primary = n.has("primary") ? n.build("primary", () -> PrimaryParam.parse(n.optText("primary", ""))) : null;
        if (!n.has("primary")) n.optText("primary", null);
        String gm = n.optText("grading", "concentric");
        GradingMode mode = n.build("grading", () -> GradingMode.parse(gm));
        if (!n.has("grades")) throw n.error("grades", "is required: a list of grades with name, bin and limits");
        List<Grade> grades = n.list("grades", g -> grade(g, type, nominal));

        SpecNode gb = n.child("guard_band");
        if (gb.has("pct") && gb.has("uncertainty_pct")) throw gb.error("pct", "give pct or uncertainty_pct, not both");
        boolean fromU = gb.has("uncertainty_pct");
        double width = fromU ? gb.optNumber("uncertainty_pct", 0, Unit.PERCENT) : gb.optNumber("pct", 0, Unit.PERCENT);
        double repeat = gb.optNumber("repeatability_pct", 0, Unit.PERCENT);
        gb.finish();
        GuardBand guard = n.build(null, () -> new GuardBand(width, fromU, repeat));

        SpecNode rm = n.child("remeasure");
        int maxReadings = rm.optInteger("max_readings", 1);
        double near = rm.optNumber("near_pct", 0, Unit.PERCENT);
        rm.finish();
        Remeasure remeasure = n.build(null, () -> new Remeasure(maxReadings, near));

        Gates gates = gates(n);
        List<TestStep> steps = n.has("steps") ? n.list("steps", st -> {
            String stepName = st.text("name");
            TestConditions stepTest = test(st);
            Gates stepGates = gates(st);
            st.finish();
            return st.build(null, () -> new TestStep(stepName, stepTest, stepGates));
        }) : List.of();

        SpecNode pl = n.child("plausible");
        PhaseWindow dfltPhase = PhaseWindow.defaultFor(type);
        double pMin = pl.optNumber("theta_min_deg", dfltPhase.minDeg(), Unit.DEGREE);
        double pMax = pl.optNumber("theta_max_deg", dfltPhase.maxDeg(), Unit.DEGREE);
        pl.finish();
        PhaseWindow plausible = n.build(null, () -> new PhaseWindow(pMin, pMax));

        if (!n.has("reject")) throw n.error("reject", "is required: bins for low, high, gate, contact, short, overload, fault");
        SpecNode r = n.child("reject");
        int low = r.integer("low"), high = r.integer("high"), gate = r.integer("gate"), contact = r.integer("contact"),
                shortBin = r.integer("short"), overload = r.integer("overload"), fault = r.integer("fault");
        int guardBin = r.optInteger("guard", -1);
        if (r.has("guard") && guardBin < 0) throw r.error("guard", "bin must be 0..999 (was " + guardBin + ")");
        r.finish();
        RejectBins reject = n.build(null, () -> new RejectBins(low, high, gate, contact, shortBin, overload, fault, guardBin));

        if (!n.has("retest")) throw n.error("retest", "is required: count and bin");
        SpecNode rt = n.child("retest");
        int count = rt.integer("count"), rbin = rt.integer("bin");
        rt.finish();
        RetestPolicy retest = n.build(null, () -> new RetestPolicy(count, rbin));

        SpecNode c = n.child("contact");
        double of = c.optNumber("open_factor", ContactCheck.DEFAULT.openFactor(), Unit.RATIO);
        double sf = c.optNumber("short_factor", ContactCheck.DEFAULT.shortFactor(), Unit.RATIO);
        c.finish();
        ContactCheck check = n.build(null, () -> new ContactCheck(of, sf, null));

        SpecNode cp = n.child("compensation");
        boolean required = cp.optBool("required", false);
        cp.finish();
        MonitorSettings monitor = monitor(n.child("monitor"), MonitorSettings.DEFAULT);
        n.finish();
        return n.build(null, () -> Recipe.builder().name(name).partType(type).nominal(nominal).test(test).model(model).primary(primary)
                .mode(mode).grades(grades).guard(guard).gates(gates).plausible(plausible).reject(reject).retest(retest).contact(check)
                .compensationRequired(required).monitor(monitor).remeasure(remeasure).steps(steps).build());
    }

    /** A {@code test:} map (the recipe's, or a later step's). */
    private static TestConditions test(SpecNode n) throws ConfigException {
        SpecNode t = n.child("test");
        TestConditions test = n.build(null, () -> new TestConditions(t.number("freq", Unit.HERTZ), t.optNumber("level_v", 1.0, Unit.VOLT),
                t.optText("speed", "medium"), t.optInteger("averaging", 1)));
        t.finish();
        return test;
    }

    /** A {@code gates:} map (the recipe's, or a later step's). */
    private static Gates gates(SpecNode n) throws ConfigException {
        SpecNode ga = n.child("gates");
        Double dMax = ga.optNumberOrNull("d_max", Unit.RATIO), qMin = ga.optNumberOrNull("q_min", Unit.RATIO),
                esr = ga.optNumberOrNull("esr_max_ohm", Unit.OHM),
                tMin = ga.optNumberOrNull("theta_min_deg", Unit.DEGREE), tMax = ga.optNumberOrNull("theta_max_deg", Unit.DEGREE);
        ga.finish();
        return n.build(null, () -> new Gates(dMax, qMin, esr, tMin, tMax));
    }

    /** The monitor's settings of a recipe ({@code monitor:}), each key optional. */
    static MonitorSettings monitor(SpecNode m, MonitorSettings d) throws ConfigException {
        int learn = m.optInteger("learn_parts", d.learnParts()), sub = m.optInteger("subgroup", d.subgroup());
        double budget = m.optNumber("false_alarms_per_shift", d.falseAlarmsPerShift(), Unit.RATIO);
        double shiftH = m.optNumber("shift_h", d.shiftH(), Unit.RATIO), rate = m.optNumber("parts_per_s", d.partsPerS(), Unit.RATIO);
        double detect = m.optNumber("detect_shift_sigma", d.detectShiftSigma(), Unit.RATIO);
        double lambda = m.optNumber("ewma_lambda", d.ewmaLambda(), Unit.RATIO), l = m.optNumber("ewma_l", d.ewmaL(), Unit.RATIO);
        double k = m.optNumber("cusum_k", d.cusumK(), Unit.RATIO), h = m.optNumber("cusum_h", d.cusumH(), Unit.RATIO);
        int clear = m.optInteger("clear_after", d.clearAfter()), window = m.optInteger("window_parts", d.windowParts());
        double neg = m.optNumber("max_negative_r_pct", d.maxNegativeRPct(), Unit.PERCENT);
        double age = m.optNumber("compensation_max_age_h", d.compMaxAgeH(), Unit.RATIO);
        double bMean = m.optNumber("baseline_mean_pct", Double.NaN, Unit.PERCENT), bSigma = m.optNumber("baseline_sigma_pct", Double.NaN, Unit.PERCENT);
        m.finish();
        return m.build(null, () -> d.toBuilder().learnParts(learn).subgroup(sub).falseAlarmsPerShift(budget).shiftH(shiftH).partsPerS(rate)
                .detectShiftSigma(detect).ewmaLambda(lambda).ewmaL(l).cusumK(k).cusumH(h).clearAfter(clear).windowParts(window)
                .maxNegativeRPct(neg).compMaxAgeH(age).baselineMeanPct(bMean).baselineSigmaPct(bSigma).build());
    }

    private static Grade grade(SpecNode g, PartType type, double nominal) throws ConfigException {
        String name = g.text("name");
        int bin = g.integer("bin");
        List<String> forms = new ArrayList<>();
        for (String k : new String[] {"tolerance", "pct", "low_pct", "low"}) if (g.has(k)) forms.add(k);
        if (g.has("high_pct") && !g.has("low_pct")) throw g.error("low_pct", "is required with high_pct");
        if (g.has("high") && !g.has("low")) throw g.error("low", "is required with high");
        if (forms.isEmpty()) throw g.error("tolerance", "give the limits: tolerance (IEC 60062 letter), pct, low_pct/high_pct or low/high");
        if (forms.size() > 1) throw g.error(forms.get(1), "give the limits one way only (found " + String.join(" and ", forms) + ")");
        Grade out = switch (forms.get(0)) {
            case "tolerance" -> Grade.ofLetter(name, bin, g.build("tolerance", () -> ToleranceCode.parse(g.optText("tolerance", ""))), type, nominal);
            case "pct" -> {
                double p = g.optNumber("pct", 0, Unit.PERCENT);
                if (!(p > 0)) throw g.error("pct", "must be > 0 (was " + p + ")");
                yield new Grade(name, bin, -p, p);
            }
            case "low_pct" -> new Grade(name, bin, g.optNumber("low_pct", 0, Unit.PERCENT), g.number("high_pct", Unit.PERCENT));
            default -> Grade.ofValues(name, bin, value(g, "low", type), value(g, "high", type), nominal);
        };
        g.finish();
        return out;
    }

    private static final java.util.regex.Pattern BARE = java.util.regex.Pattern.compile("[+-]?(?:\\d+\\.?\\d*|\\.\\d+)(?:[eE][+-]?\\d+)?");

    /**
     * A value in F, H or Ω: a plain number or SI form in the part's unit, or a marking code written
     * explicitly as {@code {code: 104}}. A bare number of 1 F or 1 H and more is refused as ambiguous:
     * it is far more often a marking code or a missing prefix than a real capacitance or inductance.
     */
    private static double value(SpecNode n, String k, PartType type) throws ConfigException {
        if (n.isMapping(k)) {
            SpecNode c = n.child(k);
            String code = c.text("code");
            c.finish();
            double v = c.build("code", () -> MarkingCode.parse(code, type));
            if (!(v > 0)) throw c.error("code", "must be > 0 (was " + code + ")");
            return v;
        }
        String text = n.text(k);
        Unit unit = Unit.of(type);
        double v = n.build(k, () -> SiValue.parse(text, unit));
        if (!(v > 0)) throw n.error(k, "must be > 0 (was " + text + ")");
        if (type != PartType.RESISTOR && v >= 1 && BARE.matcher(text.trim()).matches())
            throw n.error(k, ambiguous(text.trim(), type, unit));
        return v;
    }

    private static String ambiguous(String text, PartType type, Unit unit) {
        String code;
        try {
            code = ", or {code: " + text + "} for the marking code (= "
                    + SiValue.format(MarkingCode.parse(text, type), unit.symbol()) + ")";
        } catch (IllegalArgumentException e) {
            code = "";
        }
        return "'" + text + "' is ambiguous for " + type.withArticle() + ": as written it is " + text + " " + unit.symbol()
                + ". Write " + text + unit.symbol() + " if you mean that, a prefix for a smaller value (e.g. " + text + "n)" + code;
    }
}
