package net.zbin.core;

/**
 * The outcome of grading one reading: what the handler gets (bin, verdict) and what explains it.
 * Quantities that do not exist for this outcome are NaN; payload writers turn NaN into JSON null. D, Q,
 * ESR and θ exist only where a value was computed (a graded part, or one failed on its value, phase or
 * gates): an open contact, a short or a fault carries its R and X for diagnosis, but no loss figures,
 * since they would describe the fixture, not a part.
 *
 * @param bin       handler bin number
 * @param grade     grade name for a pass, the reject class otherwise ("low", "high", "gate", …)
 * @param verdict   pass, fail or retest
 * @param reason    kebab-case reason code (see README)
 * @param model     equivalent model used, or null when no value was computed
 * @param param     graded parameter, or null
 * @param value     value of {@code param} in SI units
 * @param devPct    deviation from nominal in percent
 * @param freqHz    test frequency in Hz
 * @param rOhm      compensated R
 * @param xOhm      compensated X
 * @param rawROhm   R as read
 * @param rawXOhm   X as read
 * @param comp      compensation source applied
 */
public record Grading(int bin, String grade, Verdict verdict, String reason, EquivalentModel model, PrimaryParam param,
                      double value, double devPct, double freqHz, double rOhm, double xOhm,
                      double rawROhm, double rawXOhm, CompensationSource comp) {
    private boolean hasZ() { return Double.isFinite(rOhm) && Double.isFinite(xOhm) && freqHz > 0; }

    private boolean hasValue() { return param != null && hasZ(); }

    /** The compensated impedance, or null when there is none. */
    public Impedance impedance() { return hasZ() ? new Impedance(freqHz, rOhm, xOhm) : null; }

    public double d() { return hasValue() ? impedance().d() : Double.NaN; }
    public double q() { return hasValue() ? impedance().q() : Double.NaN; }
    public double esrOhm() { return hasValue() ? rOhm : Double.NaN; }
    public double thetaDeg() { return hasValue() ? impedance().thetaDeg() : Double.NaN; }
    public double zOhm() { return hasZ() ? impedance().zOhm() : Double.NaN; }
    public String unit() { return param == null ? null : param.unit(); }
}
