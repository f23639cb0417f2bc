package net.zbin.core;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Random;
import org.apache.commons.math3.complex.Complex;
import org.junit.jupiter.api.Test;

class ImpedanceTest {
    private static void close(double expected, double actual, double rel, String what) {
        double tol = rel * Math.max(Math.abs(expected), Double.MIN_NORMAL);
        assertEquals(expected, actual, tol, what);
    }

    @Test
    void capacitorAtMinus88point4Degrees_hasD0point0279AndQ35point8() {
        // IEC 60384-1 (tangent of loss angle: D = tan δ, δ = 90° − |θ|, Q = 1/D), from memory: θ = −88.4° → D = tan(1.6°) ≈ 0.0279, Q ≈ 35.8.
        Impedance z = Impedance.fromPolar(1000, 1000, -88.4);
        assertEquals(0.0279, z.d(), 0.00005);
        assertEquals(35.8, z.q(), 0.05);
        assertEquals(Math.tan(Math.toRadians(1.6)), z.d(), 1e-12);
    }

    @Test
    void at45Degrees_DandQAreOne() {
        // The same definitions: at θ = 45° D = Q = 1.
        Impedance z = Impedance.fromPolar(1000, 50, 45);
        assertEquals(1.0, z.d(), 1e-12);
        assertEquals(1.0, z.q(), 1e-12);
    }

    @Test
    void inductorAt88point5Degrees_hasD0point026AndQ38() {
        // The same definitions for an inductor (Q = X/R): θ = 88.5° → D = tan 1.5° ≈ 0.026, Q ≈ 38.
        Impedance z = Impedance.fromPolar(100e3, 3, 88.5);
        assertEquals(0.026, z.d(), 0.0005);
        assertEquals(38.0, z.q(), 0.3);
        assertTrue(z.thetaDeg() > 0, "inductive reading has θ > 0");
    }

    @Test
    void perfectCapacitorIsMinus90_perfectInductorPlus90() {
        // Circuit theory (Z = 1/jωC, Z = jωL; Hayt, Kemmerly & Durbin, Engineering Circuit Analysis, from memory): a perfect C is −90°, a perfect L +90°.
        assertEquals(-90, new Impedance(1000, 0, -1591.5).thetaDeg(), 1e-12);
        assertEquals(90, new Impedance(1000, 0, 29.5).thetaDeg(), 1e-12);
    }

    @Test
    void seriesParallelIdentities_holdForRandomReadingsOfAllPartTypes() {
        // Series/parallel equivalents at one frequency (Hayt, Kemmerly & Durbin, Engineering Circuit Analysis, from memory):
        // Cp = Cs/(1+D²); Lp = Ls(1+1/Q²); Rp = Rs(1+Q²); D, Q the same in both models.
        Random rnd = new Random(42);
        for (int i = 0; i < 5000; i++) {
            double f = Math.pow(10, 1 + 6 * rnd.nextDouble());
            double r = Math.pow(10, -3 + 8 * rnd.nextDouble());
            double x = Math.pow(10, -3 + 9 * rnd.nextDouble()) * (rnd.nextBoolean() ? 1 : -1);
            Impedance z = new Impedance(f, r, x);
            double d = z.d(), q = z.q();
            if (x < 0) close(z.csF() / (1 + d * d), z.cpF(), 1e-9, "Cp = Cs/(1+D²)");
            else close(z.lsH() * (1 + 1 / (q * q)), z.lpH(), 1e-9, "Lp = Ls(1+1/Q²)");
            close(z.rsOhm() * (1 + q * q), z.rpOhm(), 1e-9, "Rp = Rs(1+Q²)");
            // D from the parallel model: G/|B|.
            close(z.gS() / Math.abs(z.bS()), d, 1e-9, "D same in parallel model");
            close(1 / d, q, 1e-12, "Q = 1/D");
        }
    }

    @Test
    void derivedValues_agreeWithCommonsMathComplexReference() {
        // Independent reference: Apache Commons Math Complex arithmetic on the definitions (Z = R + jX, Y = 1/Z).
        Random rnd = new Random(7);
        for (int i = 0; i < 5000; i++) {
            double f = Math.pow(10, 1 + 6 * rnd.nextDouble());
            double w = 2 * Math.PI * f;
            Complex zc;
            int type = i % 3;
            if (type == 0) { // capacitor with ESR
                double c = Math.pow(10, -12 + 8 * rnd.nextDouble()), esr = Math.pow(10, -3 + 3 * rnd.nextDouble());
                zc = new Complex(esr, -1 / (w * c));
            } else if (type == 1) { // inductor with winding R
                double l = Math.pow(10, -8 + 6 * rnd.nextDouble()), rw = Math.pow(10, -3 + 3 * rnd.nextDouble());
                zc = new Complex(rw, w * l);
            } else { // resistor with series L
                double res = Math.pow(10, -1 + 7 * rnd.nextDouble()), ls = 1e-9 * rnd.nextDouble();
                zc = new Complex(res, w * ls);
            }
            Impedance z = new Impedance(f, zc.getReal(), zc.getImaginary());
            Complex y = zc.reciprocal();
            close(zc.abs(), z.zOhm(), 1e-9, "|Z|");
            close(Math.toDegrees(zc.getArgument()), z.thetaDeg(), 1e-9, "θ");
            close(y.getReal(), z.gS(), 1e-9, "G");
            close(y.getImaginary(), z.bS(), 1e-9, "B");
            close(-1 / (w * zc.getImaginary()), z.csF(), 1e-9, "Cs");
            close(y.getImaginary() / w, z.cpF(), 1e-9, "Cp");
            close(zc.getImaginary() / w, z.lsH(), 1e-9, "Ls");
            close(-1 / (w * y.getImaginary()), z.lpH(), 1e-9, "Lp");
            close(1 / y.getReal(), z.rpOhm(), 1e-9, "Rp");
            close(zc.getReal() / Math.abs(zc.getImaginary()), z.d(), 1e-9, "D");
        }
    }

    @Test
    void nonFiniteOrNonPositiveFrequency_isRejectedNamingTheField() {
        var e = assertThrows(IllegalArgumentException.class, () -> new Impedance(-5, 1, 1));
        assertEquals("freqHz must be > 0 (was -5.0)", e.getMessage());
        assertThrows(IllegalArgumentException.class, () -> new Impedance(Double.NaN, 1, 1));
        assertThrows(IllegalArgumentException.class, () -> new Impedance(1000, Double.NaN, 1));
        assertThrows(IllegalArgumentException.class, () -> Impedance.fromPolar(1000, 10, 91));
    }

    @Test
    void autoModel_followsCommonPracticeThresholds() {
        // Common practice: below ~100 Ω series, above ~10 kΩ parallel.
        ModelPolicy p = ModelPolicy.DEFAULT;
        assertEquals(EquivalentModel.SERIES, p.choose(PartType.CAPACITOR, 50).model());
        assertEquals(EquivalentModel.PARALLEL, p.choose(PartType.INDUCTOR, 20_000).model());
        assertEquals(EquivalentModel.PARALLEL, p.choose(PartType.CAPACITOR, 1_000).model());
        assertEquals(EquivalentModel.SERIES, p.choose(PartType.INDUCTOR, 1_000).model());
        assertEquals("low-z-series", p.choose(PartType.RESISTOR, 1).reason());
    }
}
