package net.zbin.core;

import java.util.Set;

/**
 * What the meter is set to for a recipe. A change of any field means the setup commands are sent again.
 *
 * @param freqHz    test frequency in hertz
 * @param levelV    AC test level in volts rms
 * @param speed     integration speed: fast, medium or slow (trades noise against measurement time)
 * @param averaging readings averaged by the meter per measurement, ≥ 1
 */
public record TestConditions(double freqHz, double levelV, String speed, int averaging) {
    public static final Set<String> SPEEDS = Set.of("fast", "medium", "slow");

    public TestConditions {
        if (!(freqHz > 0) || !Double.isFinite(freqHz)) throw new SpecException("test.freq", "must be > 0 Hz (was " + freqHz + ")");
        Plausible.frequency("test.freq", freqHz);
        if (freqHz > 100e6) throw new SpecException("test.freq", "must be <= 100 MHz (was " + freqHz + ")");
        if (!(levelV > 0) || levelV > 20) throw new SpecException("test.level_v", "must be > 0 and <= 20 V (was " + levelV + ")");
        if (!SPEEDS.contains(speed)) throw new SpecException("test.speed", "must be fast, medium or slow (was " + speed + ")");
        if (averaging < 1 || averaging > 256) throw new SpecException("test.averaging", "must be 1..256 (was " + averaging + ")");
    }
}
