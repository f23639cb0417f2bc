package net.zbin.core;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.Random;
import org.junit.jupiter.api.Test;

/** The phase window judged without an atan2 agrees with θ itself (away from a bound by more than rounding). */
class PhaseWindowTest {
    @Test
    void admits_agreesWithTheAngle_forRandomReadingsAndWindows() {
        Random rnd = new Random(60);
        PhaseWindow[] windows = {PhaseWindow.defaultFor(PartType.CAPACITOR), PhaseWindow.defaultFor(PartType.INDUCTOR),
                PhaseWindow.defaultFor(PartType.RESISTOR), new PhaseWindow(-90, -5), new PhaseWindow(-30, 60), new PhaseWindow(10, 90)};
        int checked = 0;
        for (int i = 0; i < 200_000; i++) {
            double mag = Math.pow(10, -3 + 12 * rnd.nextDouble());
            double r = rnd.nextInt(20) == 0 ? 0 : mag * rnd.nextGaussian(), x = rnd.nextInt(20) == 0 ? 0 : mag * rnd.nextGaussian();
            Impedance z = new Impedance(1000, r, x);
            double t = Math.toDegrees(Math.atan2(x, Math.max(r, 0)));
            for (PhaseWindow w : windows) {
                if (Math.abs(t - w.minDeg()) < 1e-9 || Math.abs(t - w.maxDeg()) < 1e-9) continue;
                assertEquals(t >= w.minDeg() && t <= w.maxDeg(), w.admits(z), w + " at R " + r + ", X " + x + " (θ " + t + "°)");
                checked++;
            }
        }
        // The exact bounds: −90° and +90° readings (R = 0) and 0 Ω.
        assertEquals(true, windows[0].admits(new Impedance(1000, 0, -5)));
        assertEquals(true, windows[1].admits(new Impedance(1000, 0, 5)));
        assertEquals(false, windows[1].admits(new Impedance(1000, 0, 0)));
        assertEquals(true, windows[2].admits(new Impedance(1000, 0, 0)));
        assertEquals(true, checked > 1_000_000);
    }
}
