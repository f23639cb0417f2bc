package net.zbin.core;

import java.util.Arrays;

/**
 * IEC 60063 preferred-number series. E3…E24 are historical lists; E48, E96 and E192 are
 * 10^(i/N) rounded to three significant figures, except E192 index 185 which the standard fixes at 9.20.
 */
public enum ESeries {
    E3(3), E6(6), E12(12), E24(24), E48(48), E96(96), E192(192);

    /** Holder: enum constants are built before the enum's own static fields. */
    private static final class Historical {
        static final double[] E24 = {1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0,
            3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1};
    }

    private final int n;
    private final double[] mantissas;

    ESeries(int n) {
        this.n = n;
        this.mantissas = build(n);
    }

    private static double[] build(int n) {
        double[] m = new double[n];
        if (n <= 24) {
            int step = 24 / n;
            for (int i = 0; i < n; i++) m[i] = Historical.E24[i * step];
            return m;
        }
        for (int i = 0; i < n; i++) m[i] = Math.round(Math.pow(10, (double) i / n) * 100) / 100.0;
        if (n == 192) m[185] = 9.20;
        return m;
    }

    /** Values per decade. */
    public int size() { return n; }

    /** The decade mantissas 1.0 ≤ m &lt; 10, ascending. */
    public double[] mantissas() { return mantissas.clone(); }

    /** True when v (any decade) is a member within 0.01 % (values arrive as parsed doubles). */
    public boolean contains(double v) {
        double near = nearest(v);
        return Math.abs(near - v) <= 1e-4 * Math.abs(v);
    }

    /** The preferred value closest to v on a logarithmic scale (the series' own spacing). */
    public double nearest(double v) {
        Checks.positive("value", v);
        double decade = Math.pow(10, Math.floor(Math.log10(v)));
        double m = v / decade;
        double best = mantissas[0];
        double bestErr = Double.MAX_VALUE;
        double[] candidates = Arrays.copyOf(mantissas, n + 1);
        candidates[n] = 10.0;
        for (double c : candidates) {
            double err = Math.abs(Math.log(m / c));
            if (err < bestErr) {
                bestErr = err;
                best = c;
            }
        }
        return best * decade;
    }

    public static ESeries parse(String s) {
        try {
            return valueOf(s.trim().toUpperCase(java.util.Locale.ROOT));
        } catch (IllegalArgumentException e) {
            throw new IllegalArgumentException("unknown E-series '" + s + "' (E3, E6, E12, E24, E48, E96, E192)");
        }
    }
}
