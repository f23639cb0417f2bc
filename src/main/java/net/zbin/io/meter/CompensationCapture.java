package net.zbin.io.meter;

import java.io.IOException;
import java.time.Clock;
import java.util.ArrayList;
import java.util.List;
import net.zbin.core.FixtureLimits;
import net.zbin.core.Impedance;
import net.zbin.core.Reading;
import net.zbin.core.SiValue;
import net.zbin.core.TestConditions;
import net.zbin.io.CompensationStore;

/**
 * Takes open, short or load readings at each test frequency, checks that they are plausible and
 * stores them. The daemon's {@code compensate} command and {@code zbin compensate} both use this.
 */
public final class CompensationCapture {
    /** What is on the contacts for this capture. */
    public enum Kind { OPEN, SHORT, LOAD }

    /** A capture that was refused because the reading does not look like the fixture it claims to be. */
    public static final class ImplausibleException extends Exception {
        public ImplausibleException(String message) { super(message); }
    }

    /** A captured reading as people read fixtures: an open as stray C and G, a short or load as R + jX. */
    public static String describe(Kind kind, Impedance z) {
        return kind == Kind.OPEN
                ? SiValue.format(z.cpF(), "F") + " stray, " + SiValue.format(z.gS(), "S")
                : SiValue.format(z.rOhm(), "ohm") + " + j" + SiValue.format(z.xOhm(), "ohm");
    }

    private final MeterSession meter;
    private final FixtureLimits limits;
    private final Clock clock;

    public CompensationCapture(MeterSession meter, FixtureLimits limits, Clock clock) {
        this.meter = meter;
        this.limits = limits;
        this.clock = clock;
    }

    /**
     * Measures at every frequency (with the given level/speed template), and stores only when all
     * frequencies pass: a half-captured set would mix fixtures.
     *
     * @param loadStandard per-frequency true impedance of the load standard (LOAD only), else null
     * @return the averaged readings, one per frequency
     */
    public List<Impedance> capture(Kind kind, List<TestConditions> conditions, List<Impedance> loadStandard,
                                   CompensationStore store) throws MeterException, ImplausibleException, IOException {
        List<Impedance> got = new ArrayList<>();
        for (int i = 0; i < conditions.size(); i++) {
            TestConditions c = conditions.get(i);
            meter.apply(c);
            double r = 0, x = 0;
            for (int k = 0; k < limits.repeats(); k++) {
                Reading rd = meter.measure().reading();
                r += rd.rOhm();
                x += rd.xOhm();
            }
            if (!Double.isFinite(r) || !Double.isFinite(x))
                throw new ImplausibleException(kind.name().toLowerCase(java.util.Locale.ROOT) + " at " + c.freqHz() + " Hz: meter gave a non-finite reading");
            Impedance z = new Impedance(c.freqHz(), r / limits.repeats(), x / limits.repeats());
            String why = switch (kind) {
                case OPEN -> limits.checkOpen(z);
                case SHORT -> limits.checkShort(z);
                case LOAD -> limits.checkLoad(z, loadStandard.get(i));
            };
            if (why != null) throw new ImplausibleException("at " + c.freqHz() + " Hz: " + why + "; nothing was stored");
            got.add(z);
        }
        var now = clock.instant();
        for (int i = 0; i < got.size(); i++) {
            switch (kind) {
                case OPEN -> store.putOpen(got.get(i), now);
                case SHORT -> store.putShort(got.get(i), now);
                case LOAD -> store.putLoad(got.get(i), loadStandard.get(i), now);
            }
        }
        store.save();
        return got;
    }
}
