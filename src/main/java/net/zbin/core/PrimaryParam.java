package net.zbin.core;

/** The parameter a part is graded on, named as on the decision payload ("Cs", "Cp", …). */
public enum PrimaryParam {
    CS("Cs", "F", EquivalentModel.SERIES), CP("Cp", "F", EquivalentModel.PARALLEL),
    LS("Ls", "H", EquivalentModel.SERIES), LP("Lp", "H", EquivalentModel.PARALLEL),
    RS("Rs", "ohm", EquivalentModel.SERIES), RP("Rp", "ohm", EquivalentModel.PARALLEL),
    Z("Z", "ohm", null);

    private final String label;
    private final String unit;
    private final EquivalentModel model;

    PrimaryParam(String label, String unit, EquivalentModel model) {
        this.label = label;
        this.unit = unit;
        this.model = model;
    }

    public String label() { return label; }

    /** SI unit symbol written in plain ASCII ("F", "H", "ohm"). */
    public String unit() { return unit; }

    /** The equivalent model this parameter belongs to, or null for |Z| which has none. */
    public EquivalentModel model() { return model; }

    public static PrimaryParam of(PartType type, EquivalentModel model) {
        return switch (type) {
            case CAPACITOR -> model == EquivalentModel.SERIES ? CS : CP;
            case INDUCTOR -> model == EquivalentModel.SERIES ? LS : LP;
            case RESISTOR -> model == EquivalentModel.SERIES ? RS : RP;
        };
    }

    public static PrimaryParam parse(String s) {
        for (PrimaryParam p : values()) if (p.label.equalsIgnoreCase(s)) return p;
        throw new IllegalArgumentException("unknown parameter '" + s + "' (expected Cs, Cp, Ls, Lp, Rs, Rp or Z)");
    }
}
