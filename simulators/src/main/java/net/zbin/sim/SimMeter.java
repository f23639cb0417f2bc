package net.zbin.sim;

import java.time.Clock;
import java.time.Instant;
import java.util.ArrayDeque;
import java.util.Deque;
import java.util.Locale;
import java.util.Random;
import org.apache.commons.math3.complex.Complex;

/**
 * The simulated impedance meter: a command dialect of its own (plus IEEE 488.2 {@code *IDN?},
 * {@code *RST}, {@code *CLS}, {@code *OPC?}), a fixture, noise and measurement time by pace,
 * and injectable faults. Transport-free: servers feed it lines and carry out its {@link Reply}.
 *
 * <p>Dialect: {@code CONF:FREQ hz}, {@code CONF:LEV v}, {@code CONF:PACE QUICK|NORMAL|FINE},
 * {@code CONF:AVER n} (each also as a query with {@code ?}); {@code TRIG:RX?} → {@code r,x,status}
 * and {@code TRIG:ZP?} → {@code |z|,theta_deg,status} with status GOOD, OVER or FAIL;
 * {@code STAT:ERR?}. Simulation control: {@code SIM:LOAD C|L|R,v1,v2,v3[,v4]}, {@code SIM:OPEN},
 * {@code SIM:SHORT}, {@code SIM:FAULT kind[,count]}, {@code SIM:STRAY farads}, {@code SIM:DRIFT farads-per-hour},
 * {@code SIM:TRUTH?}, {@code SIM:NOISE?}.
 */
public final class SimMeter {
    /** Upper end of the measuring range; beyond it the status is OVER. */
    public static final double RANGE_MAX_OHM = 10e9;
    /** Delay of an injected slow reply, in milliseconds: longer than the shipped profile's measure timeout. */
    public static final long SLOW_MS = 2500;
    /** Delay of an injected late reply, in milliseconds: past the shipped profile's 1500 ms measure timeout. */
    public static final long LATE_MS = 1700;

    private final Contacts contacts;
    private final Clock clock;
    private final Instant start;
    private final Random rnd;
    private final double timeScale;
    private final Deque<SimFault> faults = new ArrayDeque<>();
    private final Deque<String> errors = new ArrayDeque<>();
    private final RandomFaults randomFaults;
    private Fixture fixture;
    private double freqHz = 1000;
    private double levelV = 1;
    private String pace = "NORMAL";
    private int averaging = 1;
    private long measurements;

    /**
     * Rates (per measurement) of faults drawn at random, for soak runs and demos.
     */
    public record RandomFaults(double timeout, double garbage, double overload, double stray, double late) {
        public static final RandomFaults NONE = new RandomFaults(0, 0, 0, 0, 0);

        public RandomFaults(double timeout, double garbage, double overload) { this(timeout, garbage, overload, 0, 0); }
    }

    /**
     * @param timeScale multiplies the stated measurement time actually waited (0 in tests: no waiting)
     */
    public SimMeter(Contacts contacts, Fixture fixture, Clock clock, long seed, double timeScale, RandomFaults randomFaults) {
        this.contacts = contacts;
        this.fixture = fixture;
        this.clock = clock;
        this.start = clock.instant();
        this.rnd = new Random(seed);
        this.timeScale = timeScale;
        this.randomFaults = randomFaults;
    }

    public Contacts contacts() { return contacts; }

    public synchronized void inject(SimFault f, int count) { for (int i = 0; i < count; i++) faults.add(f); }

    /** Guards {@link #held}; apart from this object's own lock, which a held reading must not keep. */
    private final Object holdLock = new Object();
    private boolean held;

    /**
     * Holds every reading from now on until {@link #releaseReadings}: a query waits before it is answered, as on a meter
     * whose measurement takes as long as the test needs (commands other than readings are answered as usual).
     */
    public void holdReadings() {
        synchronized (holdLock) { held = true; }
    }

    /** Lets held readings and later ones go. */
    public void releaseReadings() {
        synchronized (holdLock) {
            held = false;
            holdLock.notifyAll();
        }
    }

    private void awaitRelease() {
        synchronized (holdLock) {
            while (held) {
                try {
                    holdLock.wait();
                } catch (InterruptedException e) {
                    Thread.currentThread().interrupt();
                    return;
                }
            }
        }
    }

    public synchronized long measurements() { return measurements; }

    public synchronized double freqHz() { return freqHz; }

    private double noiseFactor = 1;

    /** Multiplies the meter's noise (a what-if: a noisier meter). */
    public synchronized void noiseFactor(double k) {
        if (!(k >= 0) || !Double.isFinite(k)) throw new IllegalArgumentException("noise factor must be >= 0 (was " + k + ")");
        noiseFactor = k;
    }

    /** Relative noise (σ of R and of X, as a fraction of |Z|) at the current pace and averaging. */
    public synchronized double noiseRel() {
        double base = switch (pace) {
            case "QUICK" -> 5e-4;
            case "FINE" -> 5e-5;
            default -> 2e-4;
        };
        return noiseFactor * base / Math.sqrt(averaging);
    }

    /** Stated time of one measurement in milliseconds. */
    public synchronized double measureMs() {
        double per = switch (pace) {
            case "QUICK" -> 3;
            case "FINE" -> 40;
            default -> 10;
        };
        return per * averaging;
    }

    private double hours() { return (clock.millis() - start.toEpochMilli()) / 3.6e6; }

    /** The noiseless reading of what is on the contacts now, through the fixture. */
    public synchronized Complex truth() {
        Contacts.Presented p = contacts.now();
        return switch (p.state()) {
            case OPEN -> fixture.readOpen(freqHz, hours());
            case SHORT -> fixture.readShort(freqHz, hours());
            case PART -> fixture.read(p.part().impedance(freqHz), freqHz, hours());
        };
    }

    /** Handles one line (terminator removed). Time spent measuring is slept here, scaled. */
    public Reply handle(String line) {
        String cmd = line.trim();
        if (cmd.isEmpty()) return Reply.NONE;
        String head = cmd, arg = "";
        int sp = cmd.indexOf(' ');
        if (sp > 0) {
            head = cmd.substring(0, sp);
            arg = cmd.substring(sp + 1).trim();
        }
        head = head.toUpperCase(Locale.ROOT);
        try {
            return dispatch(head, arg);
        } catch (RuntimeException e) {
            synchronized (this) {
                errors.add("-222,\"" + head + ": " + e.getMessage() + "\"");
            }
            return head.endsWith("?") ? new Reply.Text("FAIL") : Reply.NONE;
        }
    }

    private Reply dispatch(String head, String arg) {
        switch (head) {
            case "*IDN?": return new Reply.Text("ZBIN,SIMLCR-1,SN0001,1.0");
            case "*RST": synchronized (this) { freqHz = 1000; levelV = 1; pace = "NORMAL"; averaging = 1; } return Reply.NONE;
            case "*CLS": synchronized (this) { errors.clear(); } return Reply.NONE;
            case "*OPC?": return new Reply.Text("1");
            case "CONF:FREQ": synchronized (this) { freqHz = positive(arg, 10, 10e6); } return Reply.NONE;
            case "CONF:FREQ?": return new Reply.Text(Double.toString(freqHz()));
            case "CONF:LEV": synchronized (this) { levelV = positive(arg, 0.005, 20); } return Reply.NONE;
            case "CONF:LEV?": synchronized (this) { return new Reply.Text(Double.toString(levelV)); }
            case "CONF:PACE": {
                String p = arg.toUpperCase(Locale.ROOT);
                if (!p.equals("QUICK") && !p.equals("NORMAL") && !p.equals("FINE")) throw new IllegalArgumentException("pace must be QUICK, NORMAL or FINE");
                synchronized (this) { pace = p; }
                return Reply.NONE;
            }
            case "CONF:PACE?": synchronized (this) { return new Reply.Text(pace); }
            case "CONF:AVER": synchronized (this) { averaging = (int) positive(arg, 1, 256); } return Reply.NONE;
            case "CONF:AVER?": synchronized (this) { return new Reply.Text(Integer.toString(averaging)); }
            case "TRIG:RX?": return measure(false);
            case "TRIG:ZP?": return measure(true);
            case "STAT:ERR?": synchronized (this) { return new Reply.Text(errors.isEmpty() ? "0,\"no error\"" : errors.poll()); }
            case "SIM:LOAD": contacts.load(parsePart(arg), 0); return Reply.NONE;
            case "SIM:OPEN": contacts.open(); return Reply.NONE;
            case "SIM:SHORT": contacts.shortBar(); return Reply.NONE;
            case "SIM:FAULT": {
                String[] a = arg.split(",");
                inject(SimFault.parse(a[0]), a.length > 1 ? Integer.parseInt(a[1].trim()) : 1);
                return Reply.NONE;
            }
            case "SIM:STRAY": synchronized (this) { fixture = fixture.withStray(Double.parseDouble(arg)); } return Reply.NONE;
            case "SIM:DRIFT": synchronized (this) { fixture = fixture.withDrift(Double.parseDouble(arg)); } return Reply.NONE;
            case "SIM:TRUTH?": { Complex t = truth(); return new Reply.Text(fmt(t.getReal()) + "," + fmt(t.getImaginary())); }
            case "SIM:NOISE?": return new Reply.Text(Double.toString(noiseRel()));
            default:
                synchronized (this) { errors.add("-113,\"undefined header " + head + "\""); }
                return head.endsWith("?") ? new Reply.Text("FAIL") : Reply.NONE;
        }
    }

    private static double positive(String arg, double min, double max) {
        double v = Double.parseDouble(arg);
        if (!(v >= min && v <= max)) throw new IllegalArgumentException("value " + arg + " out of range " + min + ".." + max);
        return v;
    }

    private static PartModel parsePart(String arg) {
        String[] a = arg.split(",");
        double[] v = new double[4];
        for (int i = 1; i < a.length && i <= 4; i++) v[i - 1] = Double.parseDouble(a[i].trim());
        return switch (a[0].trim().toUpperCase(Locale.ROOT)) {
            case "C" -> new PartModel.Capacitor(v[0], v[1], v[2], v[3]);
            case "L" -> new PartModel.Inductor(v[0], v[1], v[2]);
            case "R" -> new PartModel.Resistor(v[0], v[1], v[2]);
            default -> throw new IllegalArgumentException("part type must be C, L or R");
        };
    }

    private Reply measure(boolean polar) {
        SimFault fault;
        Complex z;
        double sigma, ms;
        synchronized (this) {
            measurements++;
            fault = faults.poll();
            if (fault == null) fault = randomFault();
            Contacts.Presented p = contacts.now();
            boolean dropout = p.state() == Contacts.State.PART && p.intermittent() > 0 && rnd.nextDouble() < p.intermittent();
            z = dropout ? fixture.readOpen(freqHz, hours()) : truth();
            sigma = noiseRel() * z.abs();
            z = new Complex(z.getReal() + rnd.nextGaussian() * sigma, z.getImaginary() + rnd.nextGaussian() * sigma);
            ms = measureMs();
        }
        if (fault == SimFault.TIMEOUT) return Reply.SILENT;
        if (fault == SimFault.DISCONNECT) return new Reply.Disconnect();
        if (fault == SimFault.GARBAGE) {
            byte[] g = new byte[12];
            synchronized (this) { rnd.nextBytes(g); }
            for (int i = 0; i < g.length; i++) if (g[i] == '\n' || g[i] == '\r') g[i] = '#';
            return new Reply.Garbage(g);
        }
        awaitRelease();
        pause(fault == SimFault.SLOW ? SLOW_MS : ms * timeScale);
        String status = "GOOD";
        if (fault == SimFault.OVERLOAD || z.abs() > RANGE_MAX_OHM) status = "OVER";
        if (fault == SimFault.ERROR) {
            status = "FAIL";
            synchronized (this) { errors.add("-240,\"hardware: bridge unbalanced\""); }
        }
        String line = polar ? fmt(z.abs()) + "," + fmt(Math.toDegrees(z.getArgument())) + "," + status
                : fmt(z.getReal()) + "," + fmt(z.getImaginary()) + "," + status;
        if (fault == SimFault.STRAY) return new Reply.WithStray(line, line);
        if (fault == SimFault.LATE) return new Reply.Later(line, LATE_MS);
        return new Reply.Text(line);
    }

    private SimFault randomFault() {
        if (randomFaults == RandomFaults.NONE) return null;
        double u = rnd.nextDouble();
        if (u < randomFaults.timeout()) return SimFault.TIMEOUT;
        u -= randomFaults.timeout();
        if (u < randomFaults.garbage()) return SimFault.GARBAGE;
        u -= randomFaults.garbage();
        if (u < randomFaults.overload()) return SimFault.OVERLOAD;
        u -= randomFaults.overload();
        if (u < randomFaults.stray()) return SimFault.STRAY;
        u -= randomFaults.stray();
        if (u < randomFaults.late()) return SimFault.LATE;
        return null;
    }

    private static void pause(double ms) {
        if (ms <= 0) return;
        try {
            Thread.sleep((long) ms, (int) ((ms % 1) * 1e6));
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
    }

    static String fmt(double v) { return String.format(Locale.ROOT, "%.10e", v); }
}
