package net.zbin.io.meter;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.util.List;
import net.zbin.core.Compensation;
import net.zbin.core.FixtureLimits;
import net.zbin.core.Impedance;
import net.zbin.core.TestConditions;
import net.zbin.io.CompensationStore;
import net.zbin.sim.Contacts;
import net.zbin.sim.Fixture;
import net.zbin.sim.PartModel;
import net.zbin.sim.SimMeter;
import net.zbin.sim.SimTcpServer;
import org.apache.commons.math3.complex.Complex;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** Open/short captured from the simulator and applied by zbin recover the simulated part's true value. */
class CompensationCaptureTest {
    static final Fixture LEADS = new Fixture(3.1e-12, 2e-10, 0.08, 40e-9, 0); // long clip leads

    @TempDir
    Path state;

    @Test
    void capturedOpenShort_recoverTrueValueWithinNoise() throws Exception {
        SimMeter meter = new SimMeter(new Contacts(), LEADS, Clock.systemUTC(), 5, 0, SimMeter.RandomFaults.NONE);
        List<TestConditions> conds = List.of(new TestConditions(1e3, 1, "slow", 4), new TestConditions(100e3, 1, "slow", 4),
                new TestConditions(1e6, 1, "slow", 4));
        try (SimTcpServer server = new SimTcpServer(meter, 0);
             ProfileMeterSession s = ProfileMeterSession.open(Profiles.sim(TransportSpec.tcp("127.0.0.1", server.port())), Clock.systemUTC())) {
            CompensationStore store = CompensationStore.load(state);
            FixtureLimits lim = new FixtureLimits(20e-12, 1e-6, 2, 10, 16);
            CompensationCapture cap = new CompensationCapture(s, lim, Clock.systemUTC());
            meter.contacts().open();
            cap.capture(CompensationCapture.Kind.OPEN, conds, null, store);
            meter.contacts().shortBar();
            cap.capture(CompensationCapture.Kind.SHORT, conds, null, store);
            assertTrue(Files.exists(state.resolve(CompensationStore.FILE)));

            CompensationStore reloaded = CompensationStore.load(state);
            PartModel part = new PartModel.Capacitor(158e-12, 0.05, 0, 0.0008);
            meter.contacts().load(part, 0);
            for (TestConditions c : conds) {
                s.apply(c);
                Compensation comp = reloaded.forFrequency(c.freqHz());
                assertTrue(comp.isApplied());
                var rd = s.measure().reading();
                Impedance raw = new Impedance(c.freqHz(), rd.rOhm(), rd.xOhm());
                Complex truth = part.impedance(c.freqHz());
                double trueCp = new Impedance(c.freqHz(), truth.getReal(), truth.getImaginary()).cpF();
                double gotCp = comp.correct(raw).orElseThrow().cpF();
                double rawCp = raw.cpF();
                // Noise: FINE pace σ = 5e-5/√4 of |Z| per component; the open itself was averaged over 16.
                assertEquals(trueCp, gotCp, trueCp * 5e-4, "compensated Cp at " + c.freqHz() + " Hz");
                assertTrue(Math.abs(rawCp - trueCp) > 2.5e-12, "uncompensated shows the lead stray");
            }
        }
    }

    @Test
    void openWithAPartOnTheContacts_isRefusedAndNothingStored() throws Exception {
        SimMeter meter = new SimMeter(new Contacts(), LEADS, Clock.systemUTC(), 5, 0, SimMeter.RandomFaults.NONE);
        try (SimTcpServer server = new SimTcpServer(meter, 0);
             ProfileMeterSession s = ProfileMeterSession.open(Profiles.sim(TransportSpec.tcp("127.0.0.1", server.port())), Clock.systemUTC())) {
            CompensationStore store = CompensationStore.load(state);
            CompensationCapture cap = new CompensationCapture(s, FixtureLimits.DEFAULT, Clock.systemUTC());
            meter.contacts().load(new PartModel.Capacitor(100e-9, 0.02, 0, 0.01), 0);
            var e = assertThrows(CompensationCapture.ImplausibleException.class,
                    () -> cap.capture(CompensationCapture.Kind.OPEN, List.of(new TestConditions(1e3, 1, "medium", 1)), null, store));
            assertTrue(e.getMessage().contains("is a part on the contacts?"), e.getMessage());
            meter.contacts().open();
            assertThrows(CompensationCapture.ImplausibleException.class,
                    () -> cap.capture(CompensationCapture.Kind.SHORT, List.of(new TestConditions(1e3, 1, "medium", 1)), null, store));
            assertFalse(Files.exists(state.resolve(CompensationStore.FILE)));
        }
    }

    @Test
    void openShortLoadCaptured_recoverTheTruePartThroughTheStoredStandard() throws Exception {
        SimMeter meter = new SimMeter(new Contacts(), LEADS, Clock.systemUTC(), 8, 0, SimMeter.RandomFaults.NONE);
        TestConditions c = new TestConditions(100e3, 1, "slow", 4);
        try (SimTcpServer server = new SimTcpServer(meter, 0);
             ProfileMeterSession s = ProfileMeterSession.open(Profiles.sim(TransportSpec.tcp("127.0.0.1", server.port())), Clock.systemUTC())) {
            CompensationStore store = CompensationStore.load(state);
            CompensationCapture cap = new CompensationCapture(s, new FixtureLimits(20e-12, 1e-6, 2, 10, 16), Clock.systemUTC());
            meter.contacts().open();
            cap.capture(CompensationCapture.Kind.OPEN, List.of(c), null, store);
            meter.contacts().shortBar();
            cap.capture(CompensationCapture.Kind.SHORT, List.of(c), null, store);
            meter.contacts().load(new PartModel.Resistor(100, 0, 0), 0); // a 100 Ω standard, known to be 100 + j0
            cap.capture(CompensationCapture.Kind.LOAD, List.of(c), List.of(new Impedance(100e3, 100, 0)), store);

            Compensation comp = CompensationStore.load(state).forFrequency(100e3);
            assertTrue(comp.load() != null && comp.loadTrue() != null, "stored as open/short/load");
            PartModel part = new PartModel.Inductor(4.7e-6, 0.05, 0);
            meter.contacts().load(part, 0);
            s.apply(c);
            var rd = s.measure().reading();
            Impedance got = comp.correct(new Impedance(100e3, rd.rOhm(), rd.xOhm())).orElseThrow();
            double trueLs = part.impedance(100e3).getImaginary() / (2 * Math.PI * 100e3);
            // FINE pace noise is 2.5e-5 of |Z| per component; the standard and the open add their own.
            assertEquals(trueLs, got.lsH(), trueLs * 5e-4);
            meter.contacts().load(new PartModel.Resistor(150, 0, 0), 0); // the wrong standard
            assertThrows(CompensationCapture.ImplausibleException.class,
                    () -> cap.capture(CompensationCapture.Kind.LOAD, List.of(c), List.of(new Impedance(100e3, 100, 0)), store));
        }
    }
}
