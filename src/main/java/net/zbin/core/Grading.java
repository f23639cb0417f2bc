package net.zbin.core;

import java.util.List;

/**
 * The outcome of grading one reading, in three parts: what the handler gets ({@link Outcome}), what
 * was measured ({@link Measurement}, absent when nothing was), and the value graded ({@link Value},
 * absent when no value was computed). Absent parts are null, never NaN-filled; the accessors below
 * give NaN (JSON null) for a quantity that does not exist for this outcome. D, Q, ESR and θ exist only
 * where a value was computed: an open contact, a short or a fault carries its R and X for diagnosis,
 * but no loss figures, since they would describe the fixture, not a part.
 */
public record Grading(Outcome outcome, Measurement measured, Value graded, List<StepReading> steps) {
    /** A reading of a later step of the test plan, compensated at that step's frequency. */
    public record StepReading(String step, Measurement measured) {}

    /** A grading of the value step alone. */
    public Grading(Outcome outcome, Measurement measured, Value graded) { this(outcome, measured, graded, List.of()); }

    /** The same grading with the later steps' readings that were taken. */
    public Grading withSteps(List<StepReading> s) { return new Grading(outcome, measured, graded, s); }

    /**
     * @param bin     handler bin number
     * @param grade   grade name for a pass, the reject class otherwise ("low", "gate", "retest", …)
     * @param verdict pass, fail or retest
     * @param reason  why
     */
    public record Outcome(int bin, String grade, Verdict verdict, Reason reason) {
        public Outcome {
            if (grade == null || verdict == null || reason == null) throw new IllegalArgumentException("grade, verdict and reason are required");
        }
    }

    /**
     * @param freqHz  test frequency in Hz
     * @param z       the compensated impedance, or null when the reading was not finite or not correctable
     * @param rawROhm R as the meter read it (NaN when not finite)
     * @param rawXOhm X as the meter read it
     * @param comp    compensation applied to z
     * @param readings readings the raw R/X are the mean of (1 for a single reading)
     */
    public record Measurement(double freqHz, Impedance z, double rawROhm, double rawXOhm, CompensationSource comp, int readings) {
        public Measurement {
            if (comp == null) comp = CompensationSource.NONE;
            if (readings < 1) throw new IllegalArgumentException("readings must be >= 1 (was " + readings + ")");
        }

        public Measurement(double freqHz, Impedance z, double rawROhm, double rawXOhm, CompensationSource comp) {
            this(freqHz, z, rawROhm, rawXOhm, comp, 1);
        }

        public static Measurement of(Reading raw, Impedance z, CompensationSource comp) {
            return new Measurement(raw.freqHz(), z, raw.rOhm(), raw.xOhm(), comp);
        }
    }

    /**
     * @param model  equivalent model
     * @param param  graded parameter
     * @param value  its value in SI units
     * @param devPct deviation from nominal in percent
     */
    public record Value(EquivalentModel model, PrimaryParam param, double value, double devPct) {}

    public Grading {
        if (outcome == null) throw new IllegalArgumentException("outcome is required");
        steps = steps == null ? List.of() : List.copyOf(steps);
    }

    public int bin() { return outcome.bin(); }
    public String grade() { return outcome.grade(); }
    public Verdict verdict() { return outcome.verdict(); }
    public Reason reason() { return outcome.reason(); }

    public EquivalentModel model() { return graded == null ? null : graded.model(); }
    public PrimaryParam param() { return graded == null ? null : graded.param(); }
    public double value() { return graded == null ? Double.NaN : graded.value(); }
    public double devPct() { return graded == null ? Double.NaN : graded.devPct(); }
    public String unit() { return graded == null ? null : graded.param().unit(); }

    /** Test frequency in Hz, NaN when nothing was measured. */
    public double freqHz() { return measured == null ? Double.NaN : measured.freqHz(); }

    /** The compensated impedance, or null when there is none. */
    public Impedance impedance() { return measured == null ? null : measured.z(); }

    public double rOhm() { return impedance() == null ? Double.NaN : impedance().rOhm(); }
    public double xOhm() { return impedance() == null ? Double.NaN : impedance().xOhm(); }
    public double zOhm() { return impedance() == null ? Double.NaN : impedance().zOhm(); }
    public double rawROhm() { return measured == null ? Double.NaN : measured.rawROhm(); }
    public double rawXOhm() { return measured == null ? Double.NaN : measured.rawXOhm(); }
    public CompensationSource comp() { return measured == null ? CompensationSource.NONE : measured.comp(); }

    /** Readings the decision was made on (0 when nothing was measured). */
    public int readings() { return measured == null ? 0 : measured.readings(); }

    /** The same grading, said to be made on the mean of n readings. */
    public Grading withReadings(int n) {
        if (measured == null) return this;
        return new Grading(outcome, new Measurement(measured.freqHz(), measured.z(), measured.rawROhm(), measured.rawXOhm(), measured.comp(), n), graded,
                steps);
    }

    private boolean hasValue() { return graded != null && impedance() != null; }

    public double d() { return hasValue() ? impedance().d() : Double.NaN; }
    public double q() { return hasValue() ? impedance().q() : Double.NaN; }
    public double esrOhm() { return hasValue() ? impedance().rOhm() : Double.NaN; }
    public double thetaDeg() { return hasValue() ? impedance().thetaDeg() : Double.NaN; }
}
