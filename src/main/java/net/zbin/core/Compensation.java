package net.zbin.core;

import java.time.Instant;
import java.util.Optional;

/**
 * Fixture compensation for one test frequency.
 *
 * <p>Open/short: Zdut = (Zm − Zs) / (1 − (Zm − Zs)·Yo) with Yo = 1/(Zo − Zs), which is exact for a
 * series residual in front of a shunt stray, i.e. (Zo − Zs)(Zm − Zs)/(Zo − Zm); the textbook
 * Zo(Zm − Zs)/(Zo − Zm) is its limit for Zs ≪ Zo. It stays defined when only one of the two is
 * known (Yo = 0 or Zs = 0). Open/short/load additionally
 * scales by a reference part of known impedance: Zdut = Zstd(Zo − Zsm)(Zm − Zs)/((Zsm − Zs)(Zo − Zm)).
 *
 * @param freqHz   the frequency the data were taken at; applying it at another frequency is refused
 * @param source   none, the meter's factory data, or captured by zbin
 * @param takenAt  when captured (null for NONE)
 * @param open     fixture reading with nothing on the contacts, or null
 * @param shortZ   fixture reading with the contacts shorted, or null
 * @param load     reading of the load standard, or null
 * @param loadTrue the load standard's known impedance, required with {@code load}
 */
public record Compensation(double freqHz, CompensationSource source, Instant takenAt,
                           Impedance open, Impedance shortZ, Impedance load, Impedance loadTrue) {
    /** Relative frequency mismatch still accepted (the meter may round the set frequency). */
    public static final double FREQ_MATCH_REL = 1e-6;

    public Compensation {
        Checks.positive("freqHz", freqHz);
        Checks.present("source", source);
        if (source != CompensationSource.NONE) Checks.present("takenAt", takenAt);
        for (Impedance z : new Impedance[] {open, shortZ, load, loadTrue})
            if (z != null && !matches(freqHz, z.freqHz()))
                throw new IllegalArgumentException("compensation reading at " + z.freqHz()
                        + " Hz does not match freqHz " + freqHz);
        if ((load == null) != (loadTrue == null))
            throw new IllegalArgumentException("load and loadTrue must be given together");
        if (load != null && (open == null || shortZ == null))
            throw new IllegalArgumentException("load compensation needs open and short data too");
        if (open != null && open.zOhm() == 0)
            throw new IllegalArgumentException("open reading must not be 0 ohm");
    }

    /** No correction at this frequency. */
    public static Compensation none(double freqHz) {
        return new Compensation(freqHz, CompensationSource.NONE, null, null, null, null, null);
    }

    /**
     * An open given as stray capacitance and conductance (Yo = G + jωC), as engineers usually
     * state a fixture: "2 pF of stray".
     */
    public static Impedance openFromAdmittance(double freqHz, double strayCapF, double strayGS) {
        Checks.finite("strayCapF", strayCapF);
        Checks.finite("strayGS", strayGS);
        Cplx y = new Cplx(strayGS, 2 * Math.PI * freqHz * strayCapF);
        Cplx z = y.reciprocal();
        return new Impedance(freqHz, z.re(), z.im());
    }

    public static boolean matches(double a, double b) {
        return Math.abs(a - b) <= FREQ_MATCH_REL * Math.max(Math.abs(a), Math.abs(b));
    }

    public boolean isApplied() {
        return source != CompensationSource.NONE && (open != null || shortZ != null);
    }

    /**
     * The corrected DUT impedance, or empty when the correction is singular or non-finite, which
     * happens when the reading equals the open (nothing on the contacts).
     *
     * @throws IllegalArgumentException if the reading was taken at another frequency
     */
    public Optional<Impedance> correct(Impedance measured) {
        if (!matches(freqHz, measured.freqHz()))
            throw new IllegalArgumentException("reading at " + measured.freqHz()
                    + " Hz cannot use compensation taken at " + freqHz + " Hz");
        if (!isApplied()) return Optional.of(measured);
        Cplx zm = c(measured);
        Cplx zs = shortZ == null ? Cplx.ZERO : c(shortZ);
        Cplx result;
        if (load == null) {
            Cplx yo = open == null ? Cplx.ZERO : c(open).sub(zs).reciprocal();
            Cplx num = zm.sub(zs);
            result = num.div(Cplx.ONE.sub(num.mul(yo)));
        } else {
            Cplx zo = c(open), zsm = c(load), zstd = c(loadTrue);
            Cplx num = zstd.mul(zo.sub(zsm)).mul(zm.sub(zs));
            Cplx den = zsm.sub(zs).mul(zo.sub(zm));
            result = num.div(den);
        }
        if (!result.isFinite()) return Optional.empty();
        return Optional.of(new Impedance(measured.freqHz(), result.re(), result.im()));
    }

    private static Cplx c(Impedance z) { return new Cplx(z.rOhm(), z.xOhm()); }
}
