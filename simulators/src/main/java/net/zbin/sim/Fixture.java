package net.zbin.sim;

import org.apache.commons.math3.complex.Complex;

/**
 * The test fixture between meter and part: a series residual (R, L) in front of a shunt stray
 * (C, G) across the contacts. The stray C may drift linearly with time, as a fixture does when
 * it warms up or collects flux.
 *
 * @param strayF           stray capacitance across the contacts at time 0, in farads
 * @param strayGS          stray conductance in siemens
 * @param residualROhm     series residual resistance in ohms
 * @param residualLH       series residual inductance in henries
 * @param driftFPerHour    change of stray capacitance per hour, in farads
 * @param rDriftOhmPerHour change of the series residual (contact) resistance per hour, in ohms, as worn contacts do
 */
public record Fixture(double strayF, double strayGS, double residualROhm, double residualLH, double driftFPerHour,
                      double rDriftOhmPerHour) {
    public static final Fixture IDEAL = new Fixture(0, 0, 0, 0, 0);

    public Fixture(double strayF, double strayGS, double residualROhm, double residualLH, double driftFPerHour) {
        this(strayF, strayGS, residualROhm, residualLH, driftFPerHour, 0);
    }

    public Fixture withStray(double f) { return new Fixture(f, strayGS, residualROhm, residualLH, driftFPerHour, rDriftOhmPerHour); }

    public Fixture withDrift(double fph) { return new Fixture(strayF, strayGS, residualROhm, residualLH, fph, rDriftOhmPerHour); }

    private Complex series(double w, double hours) { return new Complex(residualROhm + rDriftOhmPerHour * hours, w * residualLH); }

    private Complex shunt(double w, double hours) { return new Complex(strayGS, w * (strayF + driftFPerHour * hours)); }

    /** What an ideal meter reads through this fixture with {@code zdut} on the contacts. */
    public Complex read(Complex zdut, double freqHz, double hours) {
        double w = 2 * Math.PI * freqHz;
        Complex y = shunt(w, hours).add(zdut.reciprocal());
        return series(w, hours).add(y.reciprocal());
    }

    /** Reading with nothing on the contacts. */
    public Complex readOpen(double freqHz, double hours) {
        double w = 2 * Math.PI * freqHz;
        Complex y = shunt(w, hours);
        return y.abs() == 0 ? new Complex(1e15, 0) : series(w, hours).add(y.reciprocal());
    }

    /** Reading with the contacts bridged. */
    public Complex readShort(double freqHz, double hours) { return series(2 * Math.PI * freqHz, hours); }
}
