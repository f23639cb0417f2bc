package net.zbin.core;


/**
 * Average run lengths (in chart points) of the drift charts on a standardized normal variable, by the
 * Markov-chain method: the chart statistic's continuation region is cut into small intervals, each a
 * transient state, and the ARL from the start state is a row of (I − R)⁻¹·1 (Brook &amp; Evans 1972,
 * Biometrika 59(3), for the CUSUM; the same construction for the EWMA is Lucas &amp; Saccucci 1990,
 * Technometrics 32(1)). {@code mu} is the mean of the standardized points (0 in control, the shift in σ
 * of a chart point otherwise). Pure; a few hundred states give four significant digits.
 */
public final class RunLength {
    private RunLength() {}

    /** States of the chains: enough for the published tables' digits, small enough to design in milliseconds. */
    static final int CUSUM_STATES = 120, EWMA_STATES = 141;

    /**
     * One-sided upper CUSUM S = max(0, S + x − k), signal when S &gt; h, zero start. The chain has
     * m states of width w = 2h/(2m − 1), state 0 holding S ≤ w/2 (Brook &amp; Evans 1972).
     */
    public static double cusumOneSided(double k, double h, double mu) {
        int m = CUSUM_STATES;
        double w = 2 * h / (2 * m - 1);
        // the step from state i to j depends on j − i only: Φ at the upper edge of j seen from i, for each j − i once
        double[] edge = new double[2 * m - 1];
        for (int d = -(m - 1); d < m; d++) edge[d + m - 1] = phi((d + 0.5) * w + k - mu);
        double[][] a = new double[m][m];
        for (int i = 0; i < m; i++) {
            double prev = edge[m - 1 - i];
            a[i][0] = (i == 0 ? 1 : 0) - prev;
            for (int j = 1; j < m; j++) {
                double up = edge[j - i + m - 1];
                a[i][j] = (i == j ? 1 : 0) - (up - prev);
                prev = up;
            }
        }
        return solveFrom(a, 0);
    }

    /**
     * Two-sided CUSUM (upper and lower sums, each with allowance k and interval h): 1/ARL = 1/ARL⁺ + 1/ARL⁻,
     * the usual combination for k &gt; 0 (Lucas &amp; Crosier 1982, Technometrics 24(3)).
     */
    public static double cusum(double k, double h, double mu) {
        return 1 / (1 / cusumOneSided(k, h, mu) + 1 / cusumOneSided(k, h, -mu));
    }

    /**
     * Two-sided EWMA z = λx + (1 − λ)z, signal when |z| &gt; L·√(λ/(2 − λ)) (the asymptotic limit), zero start.
     */
    public static double ewma(double lambda, double limitL, double mu) {
        int m = EWMA_STATES;
        double ucl = limitL * Math.sqrt(lambda / (2 - lambda));
        double d = 2 * ucl / m;
        double[][] a = new double[m][m];
        for (int i = 0; i < m; i++) {
            double ci = -ucl + (i + 0.5) * d, carry = (1 - lambda) * ci;
            double prev = phi((-ucl - carry) / lambda - mu);
            for (int j = 0; j < m; j++) {
                double up = phi((-ucl + (j + 1) * d - carry) / lambda - mu);
                a[i][j] = (i == j ? 1 : 0) - (up - prev);
                prev = up;
            }
        }
        return solveFrom(a, m / 2);
    }

    /**
     * Solves (I − R)·x = 1 in place by Gaussian elimination without pivoting — stable here because I − R is
     * strictly diagonally dominant by rows (each row of R sums to less than 1) — and returns x[start].
     */
    private static double solveFrom(double[][] a, int start) {
        int n = a.length;
        double[] b = new double[n];
        java.util.Arrays.fill(b, 1);
        for (int p = 0; p < n; p++) {
            double[] rp = a[p];
            for (int i = p + 1; i < n; i++) {
                double[] ri = a[i];
                double f = ri[p] / rp[p];
                if (f == 0) continue;
                for (int j = p + 1; j < n; j++) ri[j] -= f * rp[j];
                b[i] -= f * b[p];
            }
        }
        double[] x = new double[n];
        for (int i = n - 1; i >= 0; i--) {
            double s = b[i];
            for (int j = i + 1; j < n; j++) s -= a[i][j] * x[j];
            x[i] = s / a[i][i];
        }
        return x[start];
    }

    /**
     * The standard normal CDF to double precision, fast enough for the tens of thousands of transition
     * probabilities of a chain: Hart's algorithm 5666 (Hart et al. 1968, Computer Approximations) in the
     * form given by West 2005, Wilmott Magazine, "Better approximations to cumulative normal functions".
     * A unit test holds it against Commons Math's erfc.
     */
    static double phi(double x) {
        double ax = Math.abs(x), c;
        if (ax > 37) c = 0;
        else {
            double e = Math.exp(-ax * ax / 2);
            if (ax < 7.07106781186547) {
                double b = 3.52624965998911E-02 * ax + 0.700383064443688;
                b = b * ax + 6.37396220353165;
                b = b * ax + 33.912866078383;
                b = b * ax + 112.079291497871;
                b = b * ax + 221.213596169931;
                b = b * ax + 220.206867912376;
                c = e * b;
                b = 8.83883476483184E-02 * ax + 1.75566716318264;
                b = b * ax + 16.064177579207;
                b = b * ax + 86.7807322029461;
                b = b * ax + 296.564248779674;
                b = b * ax + 637.333633378831;
                b = b * ax + 793.826512519948;
                b = b * ax + 440.413735824752;
                c = c / b;
            } else {
                double b = ax + 0.65;
                b = ax + 4 / b;
                b = ax + 3 / b;
                b = ax + 2 / b;
                b = ax + 1 / b;
                c = e / b / 2.506628274631;
            }
        }
        return x > 0 ? 1 - c : c;
    }
}
