package net.zbin.io.meter;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.File;
import java.lang.management.ManagementFactory;
import java.time.Clock;
import net.zbin.core.TestConditions;
import net.zbin.sim.Contacts;
import net.zbin.sim.Fixture;
import net.zbin.sim.PartModel;
import net.zbin.sim.SimFault;
import net.zbin.sim.SimMeter;
import net.zbin.sim.SimTcpServer;
import org.junit.jupiter.api.Test;

/** A thousand link drops and reconnects leave no thread and no file descriptor behind. */
class ReconnectLeakTest {
    static int fds() {
        String[] l = new File("/proc/self/fd").list();
        return l == null ? -1 : l.length;
    }

    static int threads() { return ManagementFactory.getThreadMXBean().getThreadCount(); }

    @Test
    void thousandReconnects_leakNoThreadsOrDescriptors() throws Exception {
        SimMeter meter = new SimMeter(new Contacts(), Fixture.IDEAL, Clock.systemUTC(), 1, 0, SimMeter.RandomFaults.NONE);
        meter.contacts().load(new PartModel.Resistor(1000, 0, 0), 0);
        try (SimTcpServer server = new SimTcpServer(meter, 0);
             ProfileMeterSession s = ProfileMeterSession.open(Profiles.sim(TransportSpec.tcp("127.0.0.1", server.port())), Clock.systemUTC())) {
            s.apply(new TestConditions(1000, 1, "fast", 1));
            s.measure(); // warm up: classes loaded, first connection made
            int fd0 = fds(), th0 = threads();
            for (int i = 0; i < 1000; i++) {
                meter.inject(SimFault.DISCONNECT, 1);
                assertThrows(MeterException.class, s::measure);
                assertEquals(1000, s.measure().reading().rOhm(), 8 * meter.noiseRel() * 1000);
            }
            assertEquals(1000, s.reconnects());
            long end = System.currentTimeMillis() + 10_000;
            while ((fds() > fd0 + 2 || threads() > th0 + 2 || server.clients() > 1) && System.currentTimeMillis() < end) Thread.sleep(50);
            assertTrue(fds() <= fd0 + 2, "descriptors: " + fd0 + " before, " + fds() + " after");
            assertTrue(threads() <= th0 + 2, "threads: " + th0 + " before, " + threads() + " after");
            assertEquals(1, server.clients(), "only the live connection remains");
        }
    }
}
