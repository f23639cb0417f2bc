package net.zbin.sim;

import org.apache.commons.math3.complex.Complex;

/** A physical model of one part: its true impedance at any frequency. */
public sealed interface PartModel permits PartModel.Capacitor, PartModel.Inductor, PartModel.Resistor {
    /** True impedance in ohms at {@code freqHz}. */
    Complex impedance(double freqHz);

    /** The value a recipe grades (F, H or Ω). */
    double nominalValue();

    /** The simulator command that puts this part on the contacts. */
    String loadCommand();

    /**
     * Capacitor with ESR, ESL and dielectric loss: Z = ESR + jωL + 1/(ωC·tanδ + jωC).
     *
     * @param capF     capacitance in farads
     * @param esrOhm   equivalent series resistance in ohms
     * @param eslH     equivalent series inductance in henries
     * @param tanDelta dielectric loss tangent (frequency-independent here)
     */
    record Capacitor(double capF, double esrOhm, double eslH, double tanDelta) implements PartModel {
        public Complex impedance(double f) {
            double w = 2 * Math.PI * f;
            Complex y = new Complex(w * capF * tanDelta, w * capF);
            return new Complex(esrOhm, w * eslH).add(y.reciprocal());
        }

        public double nominalValue() { return capF; }

        public String loadCommand() { return "SIM:LOAD C," + capF + "," + esrOhm + "," + eslH + "," + tanDelta; }
    }

    /**
     * Inductor with winding resistance and self-capacitance: (Rw + jωL) ∥ 1/(jωCp).
     *
     * @param lH         inductance in henries
     * @param windingOhm winding resistance in ohms
     * @param selfCapF   inter-winding capacitance in farads
     */
    record Inductor(double lH, double windingOhm, double selfCapF) implements PartModel {
        public Complex impedance(double f) {
            double w = 2 * Math.PI * f;
            Complex zl = new Complex(windingOhm, w * lH);
            Complex yc = new Complex(0, w * selfCapF);
            return zl.reciprocal().add(yc).reciprocal();
        }

        public double nominalValue() { return lH; }

        public String loadCommand() { return "SIM:LOAD L," + lH + "," + windingOhm + "," + selfCapF; }
    }

    /**
     * Resistor with series inductance and shunt capacitance: (R + jωLs) ∥ 1/(jωCsh).
     *
     * @param rOhm     resistance in ohms
     * @param seriesLH lead/film inductance in henries
     * @param shuntCapF end-cap capacitance in farads
     */
    record Resistor(double rOhm, double seriesLH, double shuntCapF) implements PartModel {
        public Complex impedance(double f) {
            double w = 2 * Math.PI * f;
            Complex z = new Complex(rOhm, w * seriesLH);
            return z.reciprocal().add(new Complex(0, w * shuntCapF)).reciprocal();
        }

        public double nominalValue() { return rOhm; }

        public String loadCommand() { return "SIM:LOAD R," + rOhm + "," + seriesLH + "," + shuntCapF; }
    }
}
