package net.zbin.core;

/**
 * Minimal complex arithmetic on plain doubles for the compensation hot path. Package-private on
 * purpose: public results are expressed as {@link Impedance}; tests check this against Commons
 * Math {@code Complex} as an independent reference.
 */
record Cplx(double re, double im) {
    static final Cplx ZERO = new Cplx(0, 0);
    static final Cplx ONE = new Cplx(1, 0);

    Cplx add(Cplx o) { return new Cplx(re + o.re, im + o.im); }
    Cplx sub(Cplx o) { return new Cplx(re - o.re, im - o.im); }
    Cplx mul(Cplx o) { return new Cplx(re * o.re - im * o.im, re * o.im + im * o.re); }

    Cplx div(Cplx o) {
        // Smith's algorithm: avoids overflow for large |o| and keeps precision.
        if (Math.abs(o.re) >= Math.abs(o.im)) {
            double r = o.im / o.re, den = o.re + o.im * r;
            return new Cplx((re + im * r) / den, (im - re * r) / den);
        }
        double r = o.re / o.im, den = o.im + o.re * r;
        return new Cplx((re * r + im) / den, (im * r - re) / den);
    }

    Cplx reciprocal() { return ONE.div(this); }
    boolean isFinite() { return Double.isFinite(re) && Double.isFinite(im); }
}
