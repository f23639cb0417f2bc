package net.zbin.core;

import java.util.HashMap;
import java.util.HashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;

/**
 * A validated recipe: the test conditions and the bin plan for one part number. Every check that
 * relates fields to each other lives here, with the key path as written in a recipe file.
 *
 * @param name        recipe id, as named on the command topic and in records
 * @param partType    capacitor, inductor or resistor
 * @param nominal     nominal value in F, H or Ω
 * @param test        meter conditions
 * @param model       equivalent-model policy
 * @param primary     graded parameter, or null to follow the chosen model
 * @param mode        concentric or ladder grades
 * @param grades      value grades in file order
 * @param guard       guard band on acceptance limits
 * @param gates       D/Q/ESR/θ limits
 * @param plausible   phase a reading must have to be graded as this part type (null: the type's default)
 * @param reject      bins for parts without a value grade
 * @param retest      retest count and bin
 * @param contact     open/short detection
 * @param compensationRequired true: without matching compensation nothing is graded
 * @param monitor     how the line monitor watches lots of this recipe (null: the defaults)
 * @param remeasure   re-measuring near a limit (null: off)
 * @param steps       later steps of the test plan, in order (null: none): read after the value step, gates only
 */
public record Recipe(String name, PartType partType, double nominal, TestConditions test, ModelPolicy model,
                     PrimaryParam primary, GradingMode mode, List<Grade> grades, GuardBand guard, Gates gates,
                     PhaseWindow plausible, RejectBins reject, RetestPolicy retest, ContactCheck contact, boolean compensationRequired,
                     MonitorSettings monitor, Remeasure remeasure, List<TestStep> steps) {
    public Recipe {
        if (name == null || !name.matches("[A-Za-z0-9][A-Za-z0-9._-]{0,63}"))
            throw new SpecException("recipe", "must be 1..64 letters, digits, '.', '_' or '-' (was '" + name + "')");
        if (partType == null) throw new SpecException("part", "is required (capacitor, inductor or resistor)");
        if (!(nominal > 0) || !Double.isFinite(nominal))
            throw new SpecException("nominal", "must be > 0 (was " + nominal + ")");
        if (test == null) throw new SpecException("test", "is required");
        if (grades == null || grades.isEmpty()) throw new SpecException("grades", "at least one grade is required");
        grades = List.copyOf(grades);
        if (model == null) model = ModelPolicy.DEFAULT;
        if (mode == null) mode = GradingMode.CONCENTRIC;
        if (guard == null) guard = GuardBand.NONE;
        if (gates == null) gates = Gates.NONE;
        if (plausible == null) plausible = PhaseWindow.defaultFor(partType);
        if (contact == null) contact = ContactCheck.DEFAULT;
        if (monitor == null) monitor = MonitorSettings.DEFAULT;
        if (remeasure == null) remeasure = Remeasure.OFF;
        steps = steps == null ? List.of() : List.copyOf(steps);
        Set<String> stepNames = new HashSet<>();
        for (TestStep st : steps) if (!stepNames.add(st.name())) throw new SpecException("steps", "step '" + st.name() + "' is named twice");
        if (reject == null) throw new SpecException("reject", "is required (bins for low, high, gate, contact, short, overload, fault)");
        if (retest == null) throw new SpecException("retest", "is required (count and bin)");
        checkPrimary(partType, primary, model, gates);
        checkGrades(grades, mode, guard);
        checkBins(grades, reject, retest);
    }

    /** With the monitor's defaults. */
    public Recipe(String name, PartType partType, double nominal, TestConditions test, ModelPolicy model, PrimaryParam primary,
                  GradingMode mode, List<Grade> grades, GuardBand guard, Gates gates, PhaseWindow plausible, RejectBins reject,
                  RetestPolicy retest, ContactCheck contact, boolean compensationRequired) {
        this(name, partType, nominal, test, model, primary, mode, grades, guard, gates, plausible, reject, retest, contact,
                compensationRequired, null, null, null);
    }

    private static void checkPrimary(PartType type, PrimaryParam p, ModelPolicy model, Gates gates) {
        if (p == null) return;
        if (p == PrimaryParam.Z && (gates.thetaMinDeg() == null || gates.thetaMaxDeg() == null))
            throw new SpecException("primary", "Z grades |Z| whatever the phase: give gates.theta_min_deg and "
                    + "gates.theta_max_deg too, so a reactance is never sorted as a resistor");
        boolean fits = switch (type) {
            case CAPACITOR -> p == PrimaryParam.CS || p == PrimaryParam.CP;
            case INDUCTOR -> p == PrimaryParam.LS || p == PrimaryParam.LP;
            case RESISTOR -> p == PrimaryParam.RS || p == PrimaryParam.RP || p == PrimaryParam.Z;
        };
        if (!fits) throw new SpecException("primary", p.label() + " is not a parameter of " + type.withArticle());
        if (p.model() != null && model.mode() != ModelPolicy.Mode.AUTO
                && !p.model().key().equals(model.mode().name().toLowerCase(java.util.Locale.ROOT)))
            throw new SpecException("primary", p.label() + " is a " + p.model().key() + " parameter but model.mode is "
                    + model.mode().name().toLowerCase(java.util.Locale.ROOT));
    }

    private static void checkGrades(List<Grade> grades, GradingMode mode, GuardBand guard) {
        Set<String> names = new HashSet<>();
        for (int i = 0; i < grades.size(); i++) {
            Grade g = grades.get(i);
            String k = "grades[" + i + "]";
            if (g.name() == null || g.name().isBlank()) throw new SpecException(k + ".name", "is required");
            if (!names.add(g.name())) throw new SpecException(k + ".name", "grade name '" + g.name() + "' is used twice");
            if (!Double.isFinite(g.lowPct()) || !Double.isFinite(g.highPct()))
                throw new SpecException(k, "limits must be finite");
            if (g.lowPct() >= g.highPct())
                throw new SpecException(k, "low limit must be below high limit (low " + g.lowPct() + " % >= high " + g.highPct() + " %)");
            if (g.lowPct() <= -100)
                throw new SpecException(k, "low limit must be above -100 % (was " + g.lowPct() + " %)");
            if (g.bin() < 0 || g.bin() > 999) throw new SpecException(k + ".bin", "bin must be 0..999 (was " + g.bin() + ")");
        }
        if (mode == GradingMode.CONCENTRIC) {
            for (int i = 1; i < grades.size(); i++) {
                Grade prev = grades.get(i - 1), g = grades.get(i);
                if (g.lowPct() > prev.lowPct() || g.highPct() < prev.highPct()
                        || (g.lowPct() == prev.lowPct() && g.highPct() == prev.highPct()))
                    throw new SpecException("grades[" + i + "]", "concentric grades must widen, tightest first: '" + g.name()
                            + "' [" + g.lowPct() + ", " + g.highPct() + "] % does not contain '" + prev.name()
                            + "' [" + prev.lowPct() + ", " + prev.highPct() + "] %");
            }
        } else {
            for (int i = 1; i < grades.size(); i++) {
                Grade prev = grades.get(i - 1), g = grades.get(i);
                if (g.lowPct() < prev.highPct())
                    throw new SpecException("grades[" + i + "]", "ladder grades overlap or are not ascending: '" + g.name()
                            + "' starts at " + g.lowPct() + " % but '" + prev.name() + "' ends at " + prev.highPct() + " %");
                if (g.lowPct() > prev.highPct())
                    throw new SpecException("grades[" + i + "]", "ladder grades must be adjacent: gap between '" + prev.name()
                            + "' (ends " + prev.highPct() + " %) and '" + g.name() + "' (starts " + g.lowPct() + " %)");
            }
        }
        for (Grade g : grades)
            if (g.acceptLowPct(guard) >= g.acceptHighPct(guard))
                throw new SpecException(guard.key(), "guard band " + guard.widthPct() + " % of the limit leaves grade '" + g.name()
                        + "' [" + g.lowPct() + ", " + g.highPct() + "] % no acceptance");
    }

    private static void checkBins(List<Grade> grades, RejectBins reject, RetestPolicy retest) {
        Map<Integer, String> passBins = new HashMap<>();
        for (int i = 0; i < grades.size(); i++) passBins.putIfAbsent(grades.get(i).bin(), "grades[" + i + "]");
        int[] rb = reject.all();
        for (int i = 0; i < rb.length; i++) {
            String owner = passBins.get(rb[i]);
            if (owner != null)
                throw new SpecException(RejectBins.KEYS[i], "bin " + rb[i] + " is also the pass bin of " + owner
                        + " (one bin cannot mean both pass and reject)");
            if (rb[i] == retest.bin())
                throw new SpecException(RejectBins.KEYS[i], "bin " + rb[i] + " is also retest.bin (one bin cannot mean both reject and retest)");
        }
        String owner = passBins.get(retest.bin());
        if (owner != null)
            throw new SpecException("retest.bin", "bin " + retest.bin() + " is also the pass bin of " + owner);
    }

    /** Frequency the recipe measures at, in Hz. */
    public double freqHz() { return test.freqHz(); }

    /** |Z| in Ω an ideal part of the nominal shows at the test frequency. */
    public double idealZOhm() { return partType.idealZOhm(nominal, test.freqHz()); }

    /**
     * The equivalent model, resolved once from the recipe and never per reading: by the primary
     * parameter when it belongs to one model, else by the policy on the nominal's ideal |Z|. Grading a
     * part is then monotonic in its value across the whole range.
     */
    public ModelPolicy.Choice modelChoice() {
        if (primary != null && primary.model() != null && model.mode() == ModelPolicy.Mode.AUTO)
            return new ModelPolicy.Choice(primary.model(), "primary-" + primary.label());
        return model.choose(partType, idealZOhm());
    }

    /** The graded parameter: the one named, or the value of the resolved model. */
    public PrimaryParam primaryParam() {
        return primary != null ? primary : PrimaryParam.of(partType, modelChoice().model());
    }

    /** The model reported with a value: the primary's own, or the resolved one for |Z|. */
    public EquivalentModel equivalentModel() {
        PrimaryParam p = primaryParam();
        return p.model() != null ? p.model() : modelChoice().model();
    }

    /** True when the nominal cannot be told from the uncompensated open: nothing is graded without an open. */
    public boolean needsOpenCompensation() { return contact.fixture().needsOpen(idealZOhm(), freqHz()); }

    /** True when the nominal cannot be told from the uncompensated short: nothing is graded without a short. */
    public boolean needsShortCompensation() { return contact.fixture().needsShort(idealZOhm()); }

    /**
     * Why no part can ever pass on this fixture, or null: a nominal that reads like the compensated
     * fixture itself (within fixture.short_check_ohm of the short, or as high as fixture.open_check_f of
     * stray) is taken for the short bar or the empty fixture every time. Such a recipe is valid but needs a
     * tighter fixture or another test frequency; {@code check} says so.
     */
    public String unreachable() {
        FixtureBounds f = contact.fixture();
        double ideal = idealZOhm();
        if (ideal <= f.shortBandOhm())
            return "the nominal reads " + SiValue.format(ideal, "ohm") + " at the test frequency, within "
                    + SiValue.format(f.shortBandOhm(), "ohm") + " of the stored short (fixture.short_check_ohm): every part "
                    + "will be taken for the short bar; measure at another frequency or set a tighter fixture";
        if (ideal >= 1 / (2 * Math.PI * freqHz() * f.openBandF()))
            return "the nominal reads " + SiValue.format(ideal, "ohm") + " at the test frequency, as high as "
                    + SiValue.format(f.openBandF(), "F") + " of stray (fixture.open_check_f): every part will be taken for "
                    + "the empty fixture; measure at another frequency or set a tighter fixture";
        return null;
    }

    /**
     * A warning when the model was chosen for the recipe by |Z| alone and the other model's value would differ
     * by more than a tenth of the tightest grade's half-width at the recipe's loss limit (null otherwise).
     * Cs and Cp (and Ls and Lp) differ by the factor 1 + D², so a lossy family (an electrolytic at 120 Hz,
     * D 0.15: 2.25 %) is graded differently by each; such families are specified by one model, which the
     * recipe should name. Resistors and recipes without a D or Q gate are not judged.
     */
    public String modelWarning() {
        if (partType == PartType.RESISTOR) return null;
        ModelPolicy.Choice c = modelChoice();
        if (c.reason().startsWith("primary-") || c.reason().startsWith("forced-")) return null;
        double d = gates.dMax() != null ? gates.dMax() : gates.qMin() != null ? 1 / gates.qMin() : Double.NaN;
        if (!(d > 0)) return null;
        double tightest = Double.MAX_VALUE;
        for (Grade g : grades) tightest = Math.min(tightest, (g.highPct() - g.lowPct()) / 2);
        double diffPct = d * d * 100;
        if (diffPct <= tightest / 10) return null;
        String unit = partType == PartType.CAPACITOR ? "C" : "L";
        EquivalentModel other = c.model() == EquivalentModel.SERIES ? EquivalentModel.PARALLEL : EquivalentModel.SERIES;
        String identity = partType == PartType.CAPACITOR ? "Cs = Cp(1 + D²)" : "Lp = Ls(1 + D²)";
        return String.format(java.util.Locale.ROOT, "%s%s is graded (chosen by |Z| alone), but at the D limit %.4g it differs from %s%s by %.3g %%"
                        + " (%s), more than a tenth of the tightest grade's ±%.3g %%; state the model the part family is specified"
                        + " by (primary: %ss or %sp, or model.mode)", unit, c.model() == EquivalentModel.SERIES ? "s" : "p", d, unit,
                other == EquivalentModel.SERIES ? "s" : "p", diffPct, identity, tightest, unit, unit);
    }

    /** This recipe on a fixture with other bounds (the line config's). */
    public Recipe withFixture(FixtureBounds f) { return toBuilder().contact(contact.withFixture(f)).build(); }

    /** A builder holding this recipe's fields, to make a changed copy (validated again at {@link Builder#build}). */
    public Builder toBuilder() {
        return new Builder().name(name).partType(partType).nominal(nominal).test(test).model(model).primary(primary).mode(mode)
                .grades(grades).guard(guard).gates(gates).plausible(plausible).reject(reject).retest(retest).contact(contact)
                .compensationRequired(compensationRequired).monitor(monitor).remeasure(remeasure).steps(steps);
    }

    public static Builder builder() { return new Builder(); }

    /**
     * The one place a recipe is put together from its parts (the loader, {@code tune}'s sweeps, the line's fixture):
     * a new recipe key is a field here and in the record. Unset parts get the record's defaults; {@link #build} validates.
     */
    public static final class Builder {
        private String name;
        private PartType partType;
        private double nominal = Double.NaN;
        private TestConditions test;
        private ModelPolicy model;
        private PrimaryParam primary;
        private GradingMode mode;
        private List<Grade> grades;
        private GuardBand guard;
        private Gates gates;
        private PhaseWindow plausible;
        private RejectBins reject;
        private RetestPolicy retest;
        private ContactCheck contact;
        private boolean compensationRequired;
        private MonitorSettings monitor;
        private Remeasure remeasure;
        private List<TestStep> steps;

        public Builder name(String v) { name = v; return this; }
        public Builder partType(PartType v) { partType = v; return this; }
        public Builder nominal(double v) { nominal = v; return this; }
        public Builder test(TestConditions v) { test = v; return this; }
        public Builder model(ModelPolicy v) { model = v; return this; }
        public Builder primary(PrimaryParam v) { primary = v; return this; }
        public Builder mode(GradingMode v) { mode = v; return this; }
        public Builder grades(List<Grade> v) { grades = v; return this; }
        public Builder guard(GuardBand v) { guard = v; return this; }
        public Builder gates(Gates v) { gates = v; return this; }
        public Builder plausible(PhaseWindow v) { plausible = v; return this; }
        public Builder reject(RejectBins v) { reject = v; return this; }
        public Builder retest(RetestPolicy v) { retest = v; return this; }
        public Builder contact(ContactCheck v) { contact = v; return this; }
        public Builder compensationRequired(boolean v) { compensationRequired = v; return this; }
        public Builder monitor(MonitorSettings v) { monitor = v; return this; }
        public Builder remeasure(Remeasure v) { remeasure = v; return this; }
        public Builder steps(List<TestStep> v) { steps = v; return this; }

        public Recipe build() {
            return new Recipe(name, partType, nominal, test, model, primary, mode, grades, guard, gates, plausible, reject, retest,
                    contact, compensationRequired, monitor, remeasure, steps);
        }
    }
}
