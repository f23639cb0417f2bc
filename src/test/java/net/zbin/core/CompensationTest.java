package net.zbin.core;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.time.Instant;
import java.util.Random;
import org.apache.commons.math3.complex.Complex;
import org.junit.jupiter.api.Test;

class CompensationTest {
    private static final Instant T = Instant.parse("2026-11-30T06:00:00Z");

    private static Impedance imp(double f, Complex c) { return new Impedance(f, c.getReal(), c.getImaginary()); }

    /** A linear fixture: series residual Zs in front of a shunt stray admittance Yo across the DUT. */
    private static Complex throughFixture(Complex zdut, Complex zs, Complex yo) {
        return zs.add(Complex.ONE.divide(yo.add(zdut.reciprocal())));
    }

    @Test
    void part158pFReadThrough2pFStray_reads160Then158AfterOpenCompensation() {
        // Common practice: clip leads add ~1.5–3.5 pF; a 158 pF part shows ~160 pF
        // before open compensation and 158 pF after.
        double f = 1e6, w = 2 * Math.PI * f;
        Complex ydut = new Complex(0, w * 158e-12), ystray = new Complex(0, w * 2e-12);
        Impedance measured = imp(f, ydut.add(ystray).reciprocal());
        assertEquals(160e-12, measured.cpF(), 0.01e-12);
        Compensation c = new Compensation(f, CompensationSource.USER, T,
                Compensation.openFromAdmittance(f, 2e-12, 0), null, null, null);
        Impedance dut = c.correct(measured).orElseThrow();
        assertEquals(158e-12, dut.cpF(), 0.01e-12);
    }

    @Test
    void openShortRoundTrip_recoversDutThroughRandomFixtures() {
        // Compensation algebra, exact for a linear fixture (two-port algebra, derived in the test from the fixture model); fixture built with Commons Math Complex.
        Random rnd = new Random(11);
        for (int i = 0; i < 3000; i++) {
            double f = Math.pow(10, 2 + 4 * rnd.nextDouble()), w = 2 * Math.PI * f;
            Complex zs = new Complex(0.01 + 0.05 * rnd.nextDouble(), w * 20e-9 * rnd.nextDouble());
            Complex yo = new Complex(1e-9 * rnd.nextDouble(), w * (1e-12 + 4e-12 * rnd.nextDouble()));
            Complex zdut = switch (i % 3) {
                case 0 -> new Complex(0.1 + rnd.nextDouble(), -1 / (w * Math.pow(10, -11 + 5 * rnd.nextDouble())));
                case 1 -> new Complex(0.01 + rnd.nextDouble(), w * Math.pow(10, -7 + 4 * rnd.nextDouble()));
                default -> new Complex(Math.pow(10, 5 * rnd.nextDouble()), w * 1e-9 * rnd.nextDouble());
            };
            Complex zm = throughFixture(zdut, zs, yo);
            Complex zoMeasured = zs.add(yo.reciprocal()); // open: nothing on the contacts
            Compensation c = new Compensation(f, CompensationSource.USER, T, imp(f, zoMeasured), imp(f, zs), null, null);
            Impedance got = c.correct(imp(f, zm)).orElseThrow();
            assertEquals(zdut.getReal(), got.rOhm(), 1e-7 * zdut.abs());
            assertEquals(zdut.getImaginary(), got.xOhm(), 1e-7 * zdut.abs());
            // The usual open/short form Zo(Zm − Zs)/(Zo − Zm) (common practice; it is the three-term one-port error model with the
            // load term dropped, see Pozar, Microwave Engineering, from memory): the Zs ≪ Zo limit of the exact one.
            Complex textbook = zoMeasured.multiply(zm.subtract(zs)).divide(zoMeasured.subtract(zm));
            double bound = 4 * zs.abs() / zoMeasured.abs() * zdut.abs() * Math.max(1, zdut.abs() / zoMeasured.subtract(zm).abs());
            assertTrue(textbook.subtract(new Complex(got.rOhm(), got.xOhm())).abs() <= bound + 1e-7 * zdut.abs(),
                    "textbook open/short agrees to the order of |Zs|/|Zo|");
        }
    }

    @Test
    void openShortLoad_recoversDutExactlyForAnyLinearFixture() {
        // Open/short/load algebra (a linear fixture maps the impedance bilinearly — the three-term one-port error model of Pozar,
        // Microwave Engineering, from memory): Zdut = Zstd(Zo − Zsm)(Zm − Zs)/((Zsm − Zs)(Zo − Zm)); a general
        // two-port fixture is modelled as a bilinear map Zm = (aZ + b)/(cZ + 1).
        Random rnd = new Random(5);
        for (int i = 0; i < 2000; i++) {
            double f = 1e3 * (1 + 100 * rnd.nextDouble());
            Complex a = new Complex(0.9 + 0.2 * rnd.nextDouble(), 0.05 * rnd.nextGaussian());
            Complex b = new Complex(0.05 * rnd.nextDouble(), 0.02 * rnd.nextDouble());
            Complex cc = new Complex(1e-9 * rnd.nextDouble(), 1e-8 * rnd.nextDouble());
            java.util.function.Function<Complex, Complex> fixture = z -> a.multiply(z).add(b).divide(cc.multiply(z).add(1));
            Complex zo = a.divide(cc); // Z → ∞
            Complex zs = b;            // Z = 0
            Complex zstd = new Complex(100 + 900 * rnd.nextDouble(), 10 * rnd.nextGaussian());
            Complex zdut = new Complex(1 + 5000 * rnd.nextDouble(), 3000 * rnd.nextGaussian());
            Compensation comp = new Compensation(f, CompensationSource.USER, T, imp(f, zo), imp(f, zs),
                    imp(f, fixture.apply(zstd)), imp(f, zstd));
            Impedance got = comp.correct(imp(f, fixture.apply(zdut))).orElseThrow();
            assertEquals(zdut.getReal(), got.rOhm(), 1e-6 * zdut.abs());
            assertEquals(zdut.getImaginary(), got.xOhm(), 1e-6 * zdut.abs());
        }
    }

    @Test
    void compensateThenUncompensate_isIdentity() {
        // Invariant: applying the fixture model to the corrected value gives the measurement back.
        Random rnd = new Random(3);
        for (int i = 0; i < 2000; i++) {
            double f = 1e4, w = 2 * Math.PI * f;
            Complex zs = new Complex(0.02, w * 10e-9), zo = new Complex(1e6 * rnd.nextDouble(), -1 / (w * 3e-12));
            Complex zm = new Complex(10 + 100 * rnd.nextDouble(), -500 * rnd.nextDouble() - 1);
            Compensation c = new Compensation(f, CompensationSource.USER, T, imp(f, zo), imp(f, zs), null, null);
            Impedance d = c.correct(imp(f, zm)).orElseThrow();
            Complex zd = new Complex(d.rOhm(), d.xOhm());
            // Invert Zdut = (Zo − Zs)(Zm − Zs)/(Zo − Zm) for Zm: Zm = (Zdut·Zo + (Zo − Zs)·Zs)/(Zo − Zs + Zdut).
            Complex back = zd.multiply(zo).add(zo.subtract(zs).multiply(zs)).divide(zo.subtract(zs).add(zd));
            assertEquals(zm.getReal(), back.getReal(), 1e-8 * zm.abs());
            assertEquals(zm.getImaginary(), back.getImaginary(), 1e-8 * zm.abs());
        }
    }

    @Test
    void readingEqualToOpen_givesNoValue() {
        Impedance open = new Impedance(1e3, 0, -79.6e6);
        Compensation c = new Compensation(1e3, CompensationSource.USER, T, open, null, null, null);
        assertTrue(c.correct(open).isEmpty(), "the fixture itself has no DUT impedance");
    }

    @Test
    void compensationAtOtherFrequency_isRefused() {
        Compensation c = new Compensation(1e3, CompensationSource.USER, T, new Impedance(1e3, 0, -1e8), null, null, null);
        assertThrows(IllegalArgumentException.class, () -> c.correct(new Impedance(1e4, 1, -100)));
        assertThrows(IllegalArgumentException.class, () -> new Compensation(1e3, CompensationSource.USER, T,
                new Impedance(2e3, 0, -1e8), null, null, null));
        assertThrows(IllegalArgumentException.class, () -> new Compensation(1e3, CompensationSource.USER, null, null, null, null, null));
    }
}
