package net.zbin.app;

import java.io.BufferedWriter;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Instant;
import java.util.concurrent.Callable;
import net.zbin.core.Compensation;
import net.zbin.core.CompensationSource;
import net.zbin.core.Impedance;
import net.zbin.sim.Contacts;
import net.zbin.sim.LotGenerator;
import net.zbin.sim.Reply;
import net.zbin.sim.Scenario;
import net.zbin.sim.SimMeter;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVPrinter;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;

/**
 * {@code zbin sim lot}: measure a simulated lot through the simulated fixture and meter and write
 * it as CSV for {@code zbin replay}. Open and short are captured from the simulator first and
 * applied, as on a real line; the raw readings and the part's true value ride along.
 */
@Command(name = "lot", mixinStandardHelpOptions = true, sortOptions = false,
        description = {"Write a simulated lot as CSV (freq_hz, r_ohm, x_ohm compensated; raw_* as read; true_value).",
                "The file replays with: zbin replay --recipe R --in FILE"})
public final class SimLotCommand implements Callable<Integer> {
    @picocli.CommandLine.Mixin
    LotOptions lot;
    @Option(names = "--freq", paramLabel = "HZ", converter = SiConverter.Hertz.class, description = "test frequency (default: the scenario's)")
    Double freq;
    @Option(names = "--speed", defaultValue = "NORMAL", paramLabel = "PACE", description = "meter pace: QUICK, NORMAL or FINE (default ${DEFAULT-VALUE})")
    String speed;
    @Option(names = "--out", required = true, paramLabel = "FILE.csv", description = "where to write the lot")
    Path out;
    @Option(names = "--spread-x", defaultValue = "1", paramLabel = "K", description = "what if the parts' spread were K times the scenario's")
    double spreadX;
    @Option(names = "--offset-pct", paramLabel = "PCT", description = "what if the parts' mean were this far from nominal (%%)")
    Double offsetPct;
    @Option(names = "--stray-drift", paramLabel = "F_PER_H", converter = SiConverter.Farad.class, description = "what if the fixture's stray C drifted this much per hour (e.g. 0.5p)")
    Double strayDrift;
    @Option(names = "--contact-wear", paramLabel = "OHM_PER_H", converter = SiConverter.Ohm.class, description = "what if the contacts gained this resistance per hour")
    Double contactWear;
    @Option(names = "--noise-x", defaultValue = "1", paramLabel = "K", description = "what if the meter were K times as noisy")
    double noiseX;
    @Option(names = "--seconds-per-part", paramLabel = "S", description = "simulated time between parts, for drifts (default: 1 / the scenario's rate)")
    Double secondsPerPart;

    @picocli.CommandLine.Spec
    picocli.CommandLine.Model.CommandSpec spec;

    @Override
    public Integer call() throws Exception {
        if (!(spreadX >= 0)) throw new UsageException("--spread-x must be >= 0 (was " + spreadX + ")");
        if (!(noiseX >= 0)) throw new UsageException("--noise-x must be >= 0 (was " + noiseX + ")");
        Scenario sc = lot.scenario().whatIf(spreadX, offsetPct == null ? Double.NaN : offsetPct, strayDrift == null ? Double.NaN : strayDrift,
                contactWear == null ? Double.NaN : contactWear);
        long parts = lot.parts;
        double f = freq != null ? freq : sc.part().testFreq();
        double dt = secondsPerPart != null ? secondsPerPart : 1 / Math.max(1e-6, sc.handler().ratePerS());
        if (!(dt >= 0)) throw new UsageException("--seconds-per-part must be >= 0 (was " + dt + ")");
        Contacts contacts = new Contacts();
        Instant[] now = {Instant.parse("2026-12-01T06:00:00Z")};
        Clock simulated = new Clock() { // simulated time, so that drifts per hour act per part, however fast the lot is written
            public java.time.ZoneId getZone() { return java.time.ZoneOffset.UTC; }
            public Clock withZone(java.time.ZoneId z) { return this; }
            public Instant instant() { return now[0]; }
        };
        SimMeter meter = new SimMeter(contacts, sc.fixture().toFixture(), simulated, sc.seed(), 0, SimMeter.RandomFaults.NONE);
        meter.noiseFactor(noiseX);
        expectNone(meter.handle("CONF:FREQ " + f));
        expectNone(meter.handle("CONF:PACE " + speed));
        contacts.open();
        Impedance open = average(meter, f);
        contacts.shortBar();
        Impedance shortZ = average(meter, f);
        Compensation comp = new Compensation(f, CompensationSource.USER, Instant.now(), open, shortZ, null, null);
        LotGenerator gen = new LotGenerator(sc, sc.seed() + 1);
        ReadOptions.folderOf("--out", out);
        try (BufferedWriter w = Files.newBufferedWriter(out);
             CSVPrinter csv = new CSVPrinter(w, CSVFormat.DEFAULT.builder().setHeader("lot", "seq", "part", "kind", "freq_hz",
                     "r_ohm", "x_ohm", "raw_r_ohm", "raw_x_ohm", "comp", "true_value", "contact").get())) {
            for (long i = 0; i < parts; i++) {
                now[0] = now[0].plusNanos((long) (dt * 1e9));
                LotGenerator.SimPart p = gen.next();
                LotGenerator.present(p, contacts);
                double[] raw = read(meter);
                Impedance z = comp.correct(new Impedance(f, raw[0], raw[1])).orElse(null);
                csv.printRecord(sc.lot().id(), i, p.partId(), "part", f, z == null ? "" : z.rOhm(), z == null ? "" : z.xOhm(),
                        raw[0], raw[1], "user", p.model() == null ? "" : p.model().nominalValue(),
                        p.state().name().toLowerCase(java.util.Locale.ROOT));
            }
        }
        spec.commandLine().getOut().printf(java.util.Locale.ROOT, "wrote %d parts of lot %s (%s) at %s to %s%n", parts, sc.lot().id(),
                sc.scenario(), net.zbin.core.SiValue.format(f, "Hz"), out);
        return Main.EXIT_OK;
    }

    private static void expectNone(Reply r) throws UsageException {
        if (!(r instanceof Reply.None)) throw new UsageException("simulator refused a setting: " + r);
    }

    private static Impedance average(SimMeter m, double f) {
        double r = 0, x = 0;
        for (int i = 0; i < 16; i++) {
            double[] v = read(m);
            r += v[0];
            x += v[1];
        }
        return new Impedance(f, r / 16, x / 16);
    }

    private static double[] read(SimMeter m) {
        Reply r = m.handle("TRIG:RX?");
        String[] f = ((Reply.Text) r).line().split(",");
        return new double[] {Double.parseDouble(f[0]), Double.parseDouble(f[1])};
    }
}
