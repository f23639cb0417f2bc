package net.zbin.io.meter;

import java.io.IOException;
import java.time.Clock;
import java.util.List;
import net.zbin.core.FaultKind;
import net.zbin.core.Reading;
import net.zbin.core.TestConditions;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * A {@link MeterSession} driven entirely by a {@link MeterProfile}. The link is opened lazily and
 * reopened after a failure with doubling backoff (timed by the injected clock), and setup is sent
 * again after every reconnect because the meter may have been power-cycled.
 */
public final class ProfileMeterSession implements MeterSession {
    private static final Logger LOG = LoggerFactory.getLogger(ProfileMeterSession.class);

    private final MeterProfile profile;
    private final LineChannel channel;
    private final Clock clock;
    private final java.util.regex.Pattern separator;
    private TestConditions wanted;
    private TestConditions applied;
    private long backoffMs;
    private long nextAttemptAt;
    private long reconnects;
    private boolean everOpened;

    public ProfileMeterSession(MeterProfile profile, Transport transport, Clock clock) {
        this.profile = profile;
        this.channel = new LineChannel(transport, profile.terminator());
        this.clock = clock;
        this.separator = java.util.regex.Pattern.compile(java.util.regex.Pattern.quote(profile.separator()));
    }

    public static ProfileMeterSession open(MeterProfile profile, Clock clock) {
        return new ProfileMeterSession(profile, profile.transport().create(), clock);
    }

    private void ensureOpen(String forWhat) throws MeterException {
        Transport t = channel.transport();
        if (t.isOpen()) return;
        long now = clock.millis();
        if (now < nextAttemptAt)
            throw new MeterException(FaultKind.DISCONNECTED, forWhat, null, "link to " + t.describe() + " is down; next attempt in "
                    + (nextAttemptAt - now) + " ms");
        try {
            t.open();
        } catch (IOException e) {
            backoffMs = backoffMs == 0 ? profile.reconnectInitialMs() : Math.min(profile.reconnectMaxMs(), backoffMs * 2);
            nextAttemptAt = now + backoffMs;
            throw new MeterException(FaultKind.DISCONNECTED, forWhat, null, "cannot open " + t.describe() + ": " + e.getMessage(), e);
        }
        if (everOpened) {
            reconnects++;
            LOG.info("meter link {} reopened (reconnect {})", t.describe(), reconnects);
        }
        everOpened = true;
        backoffMs = 0;
        nextAttemptAt = 0;
        applied = null;
        channel.reset();
    }

    /** Opens the link if needed and brings it back in step after a failed exchange. */
    private void ready(String forWhat) throws MeterException {
        ensureOpen(forWhat);
        channel.settle(profile.syncQuery(), profile.syncExpect(), profile.commandTimeoutMs());
    }

    @Override
    public String identify() throws MeterException {
        if (profile.identifyQuery() == null) return profile.name();
        ready(profile.identifyQuery());
        String id = channel.query(profile.identifyQuery(), profile.commandTimeoutMs());
        if (profile.identifyExpect() != null && !profile.identifyExpect().matcher(id).find()) {
            channel.markDirty();
            throw new MeterException(FaultKind.GARBLED, profile.identifyQuery(), id,
                    "identification does not match " + profile.identifyExpect().pattern() + " (wrong meter or profile?)");
        }
        return id;
    }

    /**
     * Sends the setup when the conditions changed, and proves the meter took it: the error queue is read after
     * each setup command (entries left from before are read off first and logged), and each setting the profile
     * can read back is compared with what was asked. A refusal throws {@link FaultKind#SETUP_REFUSED} naming the
     * command and the meter's words; nothing counts as applied, so no reading is taken under other conditions.
     */
    @Override
    public void apply(TestConditions c) throws MeterException {
        wanted = c;
        ready("setup");
        if (c.equals(applied)) return;
        applied = null;
        clearErrorQueue();
        for (String template : profile.setup()) {
            String cmd = profile.fill(template, c);
            channel.send(cmd);
            String err = nextError(cmd);
            if (err != null) throw new MeterException(FaultKind.SETUP_REFUSED, cmd, err, "the meter refused '" + cmd + "': " + err);
        }
        if (profile.syncQuery() != null) {
            String r = channel.syncQuery(profile.syncQuery(), profile.commandTimeoutMs());
            if (!profile.syncExpect().matcher(r).find()) {
                channel.markDirty();
                throw new MeterException(FaultKind.GARBLED, profile.syncQuery(), r, "setup not confirmed");
            }
        }
        for (var rb : profile.readback().entrySet()) readBack(rb.getKey(), rb.getValue(), c);
        applied = c;
    }

    /** Relative difference a read-back setting may show (a meter echoes 1e6 as 1.000000E+06). */
    private static final double READBACK_REL = 1e-6;

    private void readBack(String setting, String query, TestConditions c) throws MeterException {
        double want = setting.equals("freq_hz") ? c.freqHz() : c.levelV();
        String reply = channel.query(query, profile.commandTimeoutMs());
        double got;
        try {
            got = Double.parseDouble(reply.trim());
        } catch (NumberFormatException e) {
            channel.markDirty();
            throw new MeterException(FaultKind.GARBLED, query, reply, setting + " read back is not a number");
        }
        if (!(Math.abs(got - want) <= READBACK_REL * Math.abs(want)))
            throw new MeterException(FaultKind.SETUP_REFUSED, query, reply, "the meter runs at " + setting + " " + reply.trim()
                    + " where " + num(want) + " was set: the setting did not take");
    }

    /** Reads off the error queue entries left from before this setup, so that none is taken for a refusal. */
    private void clearErrorQueue() throws MeterException {
        for (int i = 0; i < 32; i++) {
            String e = nextError("setup");
            if (e == null) return;
            LOG.info("meter error queue before setup: {}", e);
        }
    }

    /** The next error queue entry, or null when the queue says none (or the profile has no error query). */
    private String nextError(String after) throws MeterException {
        if (profile.errorQuery() == null) return null;
        String e = channel.query(profile.errorQuery(), profile.commandTimeoutMs());
        if (profile.errorNone() == null || profile.errorNone().matcher(e).find()) return null;
        return e.trim();
    }

    private static String num(double v) { return v == Math.rint(v) && Math.abs(v) < 1e15 ? Long.toString((long) v) : Double.toString(v); }

    @Override
    public MeterReading measure() throws MeterException {
        if (wanted == null) throw new IllegalStateException("apply test conditions before measuring");
        ready(profile.measureQuery());
        if (!wanted.equals(applied)) apply(wanted);
        long t0 = System.nanoTime();
        String q = profile.measureQuery();
        String reply;
        if (profile.confirmReadings()) {
            reply = channel.queryConfirmed(q, profile.syncQuery(), profile.syncExpect(), profile.measureTimeoutMs(), profile.commandTimeoutMs());
        } else {
            reply = channel.query(q, profile.measureTimeoutMs());
            channel.failIfMoreFollows(q, reply);
        }
        double ms = (System.nanoTime() - t0) / 1e6;
        try {
            return new MeterReading(parse(reply), ms);
        } catch (MeterException e) {
            if (e.kind() == FaultKind.GARBLED) channel.markDirty();
            throw e;
        }
    }

    private Reading parse(String reply) throws MeterException {
        Parsed p = parse(profile, separator, reply);
        String q = profile.measureQuery();
        if (p.status() != null && !p.status().equals(profile.statusOk())) {
            if (profile.statusOverload().contains(p.status()))
                throw new MeterException(FaultKind.OVERLOAD, q, reply, "meter reports overload (status " + p.status() + ")");
            throw new MeterException(FaultKind.INSTRUMENT_ERROR, q, reply, "meter status " + p.status() + errorQueue());
        }
        return new Reading(wanted.freqHz(), p.rOhm(), p.xOhm());
    }

    /** The fields of one measure reply as the profile names them. */
    record Parsed(double rOhm, double xOhm, String status) {}

    /**
     * Splits and reads one measure reply by the profile's fields; a reply that does not fit is a typed
     * GARBLED failure carrying the query and the reply, never another exception.
     */
    static Parsed parse(MeterProfile profile, java.util.regex.Pattern separator, String reply) throws MeterException {
        String q = profile.measureQuery();
        String[] parts = separator.split(reply.trim(), -1);
        List<MeterProfile.Field> fields = profile.fields();
        if (parts.length != fields.size())
            throw new MeterException(FaultKind.GARBLED, q, reply, "expected " + fields.size() + " fields, got " + parts.length);
        double r = Double.NaN, x = Double.NaN, z = Double.NaN, theta = Double.NaN;
        boolean radians = false;
        String status = null;
        for (int i = 0; i < parts.length; i++) {
            String p = parts[i].trim();
            switch (fields.get(i)) {
                case STATUS -> status = p;
                case IGNORE -> { }
                case R_OHM -> r = number(q, p, reply);
                case X_OHM -> x = number(q, p, reply);
                case Z_OHM -> z = number(q, p, reply);
                case THETA_DEG -> theta = number(q, p, reply);
                case THETA_RAD -> { theta = number(q, p, reply); radians = true; }
            }
        }
        if (Double.isNaN(r)) {
            double t = radians ? theta : Math.toRadians(theta);
            r = z * Math.cos(t);
            x = z * Math.sin(t);
        }
        return new Parsed(r, x, status);
    }

    private String errorQueue() {
        if (profile.errorQuery() == null) return "";
        try {
            String e = channel.query(profile.errorQuery(), profile.commandTimeoutMs());
            return profile.errorNone() != null && profile.errorNone().matcher(e).find() ? "" : "; error queue: " + e;
        } catch (MeterException e) {
            return "; error queue unreadable (" + e.kind().reason() + ")";
        }
    }

    private static double number(String query, String p, String reply) throws MeterException {
        try {
            return Double.parseDouble(p);
        } catch (NumberFormatException e) {
            throw new MeterException(FaultKind.GARBLED, query, reply, "field '" + p + "' is not a number");
        }
    }

    /** The bringing back in step (one command timeout), the reading's timeout, and its confirmation's where readings are confirmed. */
    @Override
    public long longestReadingMs() {
        return profile.commandTimeoutMs() + (long) profile.measureTimeoutMs() + (profile.confirmReadings() ? profile.commandTimeoutMs() : 0);
    }

    @Override
    public long reconnects() { return reconnects; }

    @Override
    public long unaskedBytes() { return channel.unaskedBytes(); }

    @Override
    public void close() { channel.transport().close(); }
}
