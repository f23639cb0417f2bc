package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import net.zbin.sim.Contacts;
import net.zbin.sim.Fixture;
import net.zbin.sim.PartModel;
import net.zbin.sim.SimMeter;
import net.zbin.sim.SimTcpServer;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

class CompensateCommandTest {
    @TempDir
    Path dir;

    /** The simulated meter on a fixture with a few pF of stray and some residual R and L (invented). */
    static SimMeter fixtureMeter() {
        return new SimMeter(new Contacts(), new Fixture(2.2e-12, 1e-10, 0.03, 12e-9, 0), Clock.systemUTC(), 3, 0, SimMeter.RandomFaults.NONE);
    }

    @Test
    void openThenShort_areStoredAtEveryRecipeFrequency_andCheckShowsThem() throws Exception {
        SimMeter meter = fixtureMeter();
        try (SimTcpServer sim = new SimTcpServer(meter, 0)) {
            Path cfg = TestLine.write(dir, "cal-1", "tcp://127.0.0.1:1883", sim.port(), "");
            meter.contacts().open();
            Cli open = Cli.run("compensate", "--config", cfg.toString(), "open");
            assertEquals(0, open.exit(), open.err());
            assertTrue(open.out().contains("open at 1.000 kHz: 2.2"), open.out());
            assertTrue(open.out().contains("open at 100.0 kHz"), open.out());
            meter.contacts().shortBar();
            assertEquals(0, Cli.run("compensate", "--config", cfg.toString(), "short", "--freq", "1k").exit());
            Path store = dir.resolve("state-cal-1/compensation.yaml");
            String text = Files.readString(store);
            assertTrue(text.contains("freq_hz: 1000.0") && text.contains("short:") && text.contains("taken_at:"), text);
            Cli check = Cli.run("check", "--config", cfg.toString());
            assertEquals(0, check.exit(), check.err());
            assertTrue(check.out().contains("mlcc-x7r-100n          100.0 nF at 1.000 kHz, compensation taken"), check.out());

            meter.contacts().load(new PartModel.Capacitor(100e-9, 0.02, 0, 0.01), 0);
            String before = Files.readString(store);
            Cli refused = Cli.run("compensate", "--config", cfg.toString(), "open");
            assertEquals(1, refused.exit());
            assertTrue(refused.err().contains("open refused"), refused.err());
            assertEquals(before, Files.readString(store), "a refused capture stores nothing");
            assertEquals(2, Cli.run("compensate", "--config", cfg.toString(), "sideways").exit());
            assertEquals(2, Cli.run("compensate", "--config", cfg.toString(), "load").exit());
        }
    }

    @Test
    void meterNotReachable_exits1WithTheLinkInTheMessage() throws Exception {
        Path cfg = TestLine.write(dir, "cal-2", "tcp://127.0.0.1:1883", 1, "");
        Cli c = Cli.run("compensate", "--config", cfg.toString(), "open");
        assertEquals(1, c.exit());
        assertTrue(c.err().contains("meter-disconnected") && c.err().contains("tcp 127.0.0.1:1"), c.err());
        assertFalse(Files.exists(dir.resolve("state-cal-2/compensation.yaml")));
    }

    @Test
    void whileTheDaemonHoldsTheLine_compensateRefuses_namingTheHolderAndTheCommandTopic() throws Exception {
        SimMeter meter = fixtureMeter();
        try (SimTcpServer sim = new SimTcpServer(meter, 0)) {
            Path cfg = TestLine.write(dir, "cal-3", "tcp://127.0.0.1:1883", sim.port(), "");
            meter.contacts().open();
            try (net.zbin.io.LineLock daemonHolds = net.zbin.io.LineLock.acquire(dir.resolve("state-cal-3"), "cal-3")) {
                Cli c = Cli.run("compensate", "--config", cfg.toString(), "open");
                assertEquals(1, c.exit());
                assertTrue(c.err().contains("line 'cal-3' is already served by process " + ProcessHandle.current().pid()), c.err());
                assertTrue(c.err().contains("publish {\"cmd\": \"compensate\", \"kind\": \"open\"} to zbin/cal-3/command"), c.err());
                assertEquals(0, meter.measurements(), "the meter was not touched");
            }
            assertEquals(0, Cli.run("compensate", "--config", cfg.toString(), "open", "--freq", "1k").exit(), "free again");
        }
    }

    @Test
    void aCaptureAtOneFrequency_keepsTheOthers_andThePreviousFileBesideIt() throws Exception {
        SimMeter meter = fixtureMeter();
        try (SimTcpServer sim = new SimTcpServer(meter, 0)) {
            Path cfg = TestLine.write(dir, "cal-4", "tcp://127.0.0.1:1883", sim.port(), "");
            meter.contacts().open();
            assertEquals(0, Cli.run("compensate", "--config", cfg.toString(), "open", "--freq", "1k").exit());
            Path store = dir.resolve("state-cal-4/compensation.yaml");
            String first = Files.readString(store);
            assertEquals(0, Cli.run("compensate", "--config", cfg.toString(), "open", "--freq", "100k").exit());
            String both = Files.readString(store);
            assertTrue(both.contains("freq_hz: 1000.0") && both.contains("freq_hz: 100000.0"), both);
            assertEquals(first, Files.readString(dir.resolve("state-cal-4/compensation.yaml.prev")), "the replaced file is kept");
        }
    }
}
