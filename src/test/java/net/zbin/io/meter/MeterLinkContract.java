package net.zbin.io.meter;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.time.Clock;
import net.zbin.core.FaultKind;
import net.zbin.core.TestConditions;
import net.zbin.sim.Contacts;
import net.zbin.sim.Fixture;
import net.zbin.sim.PartModel;
import net.zbin.sim.SimFault;
import net.zbin.sim.SimMeter;
import org.apache.commons.math3.complex.Complex;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** One contract for the meter link, run over every transport: the real pty and real TCP. */
abstract class MeterLinkContract {
    static final Fixture FIXTURE = new Fixture(2.2e-12, 1e-10, 0.03, 12e-9, 0);
    static final TestConditions COND = new TestConditions(1000, 1, "medium", 1);

    @TempDir
    Path dir;
    SimMeter meter;
    ProfileMeterSession session;

    /** Starts the simulator's side of the link and returns the profile for zbin's side. */
    abstract MeterProfile start(SimMeter meter, Path dir) throws Exception;

    abstract void stop() throws Exception;

    @BeforeEach
    void up() throws Exception {
        meter = new SimMeter(new Contacts(), FIXTURE, Clock.systemUTC(), 17, 0, SimMeter.RandomFaults.NONE);
        MeterProfile p = start(meter, dir);
        session = ProfileMeterSession.open(p, Clock.systemUTC());
    }

    @AfterEach
    void down() throws Exception {
        session.close();
        stop();
    }

    @Test
    void identify_matchesTheProfile() throws Exception {
        assertTrue(session.identify().startsWith("ZBIN,SIMLCR"));
    }

    @Test
    void tenThousandReadings_allParsedAndWithinStatedNoiseOfTruth() throws Exception {
        session.apply(COND);
        PartModel[] parts = {new PartModel.Capacitor(100e-9, 0.02, 0.6e-9, 0.012),
                new PartModel.Inductor(4.7e-6, 0.05, 3e-12), new PartModel.Resistor(4990, 2e-9, 0.1e-12)};
        for (int i = 0; i < 10_000; i++) {
            meter.contacts().load(parts[i % 3], 0);
            Complex truth = meter.truth();
            double bound = 6 * meter.noiseRel() * truth.abs(); // 6σ: chance of a false failure ~1e-5 over the run
            MeterReading r = session.measure();
            assertEquals(truth.getReal(), r.reading().rOhm(), bound, "R of reading " + i);
            assertEquals(truth.getImaginary(), r.reading().xOhm(), bound, "X of reading " + i);
        }
        assertEquals(10_000, meter.measurements());
    }

    @Test
    void setup_isSentOnlyWhenConditionsChange() throws Exception {
        session.apply(COND);
        session.measure();
        meter.handle("CONF:FREQ 5000"); // someone changed the meter behind zbin's back: zbin does not look
        session.apply(COND);
        assertEquals(5000, meter.freqHz(), "same conditions: nothing re-sent");
        session.apply(new TestConditions(2000, 1, "medium", 1));
        assertEquals(2000, meter.freqHz());
    }

    @Test
    void injectedTimeout_givesTimeoutWithinConfiguredTime_thenRecovers() throws Exception {
        session.apply(COND);
        meter.contacts().load(new PartModel.Capacitor(100e-9, 0.02, 0, 0.01), 0);
        meter.inject(SimFault.TIMEOUT, 1);
        long t0 = System.nanoTime();
        MeterException e = assertThrows(MeterException.class, session::measure);
        long ms = (System.nanoTime() - t0) / 1_000_000;
        assertEquals(FaultKind.TIMEOUT, e.kind());
        assertEquals("TRIG:RX?", e.sent());
        // The bound catches a hang, not a slow machine.
        assertTrue(ms < 1500 + 10_000, "timeout after " + ms + " ms, configured 1500");
        assertGood();
    }

    @Test
    void injectedGarbage_givesGarbledWithWhatCameBack_thenRecovers() throws Exception {
        session.apply(COND);
        meter.inject(SimFault.GARBAGE, 1);
        MeterException e = assertThrows(MeterException.class, session::measure);
        assertEquals(FaultKind.GARBLED, e.kind());
        assertTrue(e.received() != null && !e.received().isEmpty());
        assertGood();
    }

    @Test
    void injectedOverloadAndError_giveTheirKinds_thenRecover() throws Exception {
        session.apply(COND);
        meter.inject(SimFault.OVERLOAD, 1);
        assertEquals(FaultKind.OVERLOAD, assertThrows(MeterException.class, session::measure).kind());
        meter.inject(SimFault.ERROR, 1);
        MeterException e = assertThrows(MeterException.class, session::measure);
        assertEquals(FaultKind.INSTRUMENT_ERROR, e.kind());
        assertTrue(e.getMessage().contains("bridge unbalanced"), "error queue read: " + e.getMessage());
        assertGood();
    }

    @Test
    void slowReply_timesOut_andTheLateReplyIsNotTakenForTheNextReading() throws Exception {
        session.apply(COND);
        meter.contacts().load(new PartModel.Resistor(1000, 0, 0), 0);
        meter.inject(SimFault.SLOW, 1);
        assertEquals(FaultKind.TIMEOUT, assertThrows(MeterException.class, session::measure).kind());
        // The late reply (of the 1 kΩ part) lands while the next part, 47 kΩ, is on the contacts. Measure at
        // once and on: exchanges may fail while the link gets back in step, but no success may be the stale 1 kΩ.
        meter.contacts().load(new PartModel.Resistor(47_000, 0, 0), 0);
        // bounded by time, not by a count of tries: how many exchanges fit in the late reply's delay depends on the machine
        long giveUp = System.nanoTime() + 30_000_000_000L;
        while (true) {
            try {
                MeterReading next = session.measure();
                assertEquals(47_000, next.reading().rOhm(), 47_000 * 1e-2, "reading belongs to the part now on the contacts");
                break;
            } catch (MeterException e) {
                assertTrue(System.nanoTime() < giveUp, "link never came back in step within 30 s: " + e.getMessage());
            }
        }
        for (int i = 0; i < 20; i++) assertEquals(47_000, session.measure().reading().rOhm(), 47_000 * 1e-2, "in step afterwards");
    }

    @Test
    void injectedDisconnect_isReportedAndTheSessionRecovers() throws Exception {
        session.apply(COND);
        meter.inject(SimFault.DISCONNECT, 1);
        MeterException e = assertThrows(MeterException.class, session::measure);
        assertTrue(e.kind() == FaultKind.DISCONNECTED || e.kind() == FaultKind.TIMEOUT, e.getMessage());
        long end = System.currentTimeMillis() + 5000;
        while (true) {
            try {
                assertGood();
                return;
            } catch (MeterException again) {
                if (System.currentTimeMillis() > end) throw again;
                Thread.sleep(20);
            }
        }
    }

    /**
     * Measures with parts changing each time until {@code ms} of wall time have passed (the late and stray lines
     * need time to land); every reading that is given must be the part on the contacts now. Returns the successes.
     */
    int everyReadingIsThePartOnTheContacts(long ms) throws Exception {
        PartModel[] parts = {new PartModel.Resistor(1000, 0, 0), new PartModel.Resistor(47_000, 0, 0), new PartModel.Resistor(4700, 0, 0)};
        long end = System.nanoTime() + ms * 1_000_000L, giveUp = end + 30_000_000_000L;
        int ok = 0, i = 0;
        while (System.nanoTime() < end || ok < 5) {
            assertTrue(System.nanoTime() < giveUp, "link not back in step 30 s after the fault (" + ok + " readings)");
            PartModel.Resistor p = (PartModel.Resistor) parts[i++ % parts.length];
            meter.contacts().load(p, 0);
            try {
                double r = session.measure().reading().rOhm();
                assertEquals(p.rOhm(), r, p.rOhm() * 1e-2, "reading " + i + " belongs to the part on the contacts");
                ok++;
            } catch (MeterException e) {
                assertTrue(e.kind() == FaultKind.GARBLED || e.kind() == FaultKind.TIMEOUT, e.getMessage());
            }
        }
        return ok;
    }

    @Test
    void strayLineAfterAReply_isNeverTakenForALaterPartsReading() throws Exception {
        session.apply(COND);
        meter.contacts().load(new PartModel.Resistor(1000, 0, 0), 0);
        meter.inject(SimFault.STRAY, 1);
        try {
            assertEquals(1000, session.measure().reading().rOhm(), 10);
        } catch (MeterException e) {
            assertEquals(FaultKind.GARBLED, e.kind(), "the line behind the reply is noticed: " + e.getMessage());
        }
        meter.contacts().load(new PartModel.Resistor(47_000, 0, 0), 0);
        try {
            assertEquals(47_000, session.measure().reading().rOhm(), 470, "the stray 1 kΩ line is not this part's reading");
        } catch (MeterException e) {
            assertTrue(e.kind() == FaultKind.GARBLED || e.kind() == FaultKind.TIMEOUT, e.getMessage());
        }
        everyReadingIsThePartOnTheContacts(200);
    }

    @Test
    void lateReplyAfterATimeout_landingMidExchange_isNeverTakenForAReading() throws Exception {
        session.apply(COND);
        meter.contacts().load(new PartModel.Resistor(1000, 0, 0), 0);
        meter.inject(SimFault.LATE, 1);
        assertEquals(FaultKind.TIMEOUT, assertThrows(MeterException.class, session::measure).kind());
        // the late 1 kΩ line lands LATE_MS after its query, while readings of other parts go on
        int ok = everyReadingIsThePartOnTheContacts(SimMeter.LATE_MS + 300);
        assertTrue(ok >= 5);
    }

    @Test
    void refusedFrequency_isSetupRefused_namingTheCommandAndTheMetersWords_andNothingIsMeasured() throws Exception {
        session.apply(COND);
        meter.contacts().load(new PartModel.Resistor(1000, 0, 0), 0);
        session.measure();
        long before = meter.measurements();
        TestConditions tooHigh = new TestConditions(100e6, 1, "medium", 1); // beyond the simulator's 10 MHz
        MeterException e = assertThrows(MeterException.class, () -> session.apply(tooHigh));
        assertEquals(FaultKind.SETUP_REFUSED, e.kind());
        assertEquals("CONF:FREQ 100000000", e.sent());
        assertTrue(e.received().startsWith("-222"), "the meter's own words: " + e.received());
        assertEquals(1000, meter.freqHz(), "the meter goes on at its old frequency");
        MeterException again = assertThrows(MeterException.class, session::measure);
        assertEquals(FaultKind.SETUP_REFUSED, again.kind(), "a reading under the old conditions is never taken");
        assertEquals(before, meter.measurements());
        session.apply(COND); // a recipe the meter can run: in service again
        assertGood();
    }

    @Test
    void anOldErrorInTheQueue_isNotTakenForARefusal() throws Exception {
        meter.handle("NOT:A:COMMAND"); // leaves -113 in the error queue
        session.apply(COND);
        assertGood();
    }

    void assertGood() throws Exception {
        meter.contacts().load(new PartModel.Resistor(1000, 0, 0), 0);
        Complex truth = meter.truth();
        MeterReading r = session.measure();
        assertEquals(truth.getReal(), r.reading().rOhm(), 6 * meter.noiseRel() * truth.abs());
    }
}
