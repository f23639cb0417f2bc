package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.TimeUnit;
import net.zbin.app.daemon.CpuPin;
import net.zbin.sim.Contacts;
import net.zbin.sim.PartModel;
import net.zbin.sim.SimMeter;
import net.zbin.sim.SimTcpServer;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * {@code pin_cpu}: the real {@code zbin run} process keeps every thread on the CPU its config names from ready on, but for
 * the JIT compiler's, which run on the other CPUs it may use.
 */
class PinnedLineIT {
    @TempDir
    Path dir;

    /** Each thread's name and allowed CPUs, of process {@code pid}. */
    static List<String> threadsOf(long pid) throws Exception {
        List<String> out = new ArrayList<>();
        try (var tasks = Files.list(Path.of("/proc", Long.toString(pid), "task"))) {
            for (Path t : tasks.toList()) {
                try {
                    String allowed = Files.readAllLines(t.resolve("status")).stream().filter(l -> l.startsWith("Cpus_allowed_list:"))
                            .map(l -> l.substring(l.indexOf(':') + 1).trim()).findFirst().orElse("?");
                    out.add(Files.readString(t.resolve("comm")).trim() + "=" + allowed);
                } catch (java.io.IOException ended) { // the thread ended meanwhile
                }
            }
        }
        return out;
    }

    @Test
    void pinnedLine_everyThreadButTheCompilersOnItsCpuFromReady_andItStillDecides() throws Exception {
        Integer cpu = TestLine.quietCpu(); // the daemon, a process of its own, is pinned to it (as a careful engineer picks it)
        assertTrue(cpu != null, "no Cpus_allowed_list in /proc/self/status");
        SimMeter meter = new SimMeter(new Contacts(), net.zbin.sim.Fixture.IDEAL, Clock.systemUTC(), 9, 0, SimMeter.RandomFaults.NONE);
        meter.contacts().load(new PartModel.Capacitor(100e-9, 0.02, 0, 0.01), 0);
        Process daemon = null;
        try (EmbeddedBroker broker = new EmbeddedBroker(Files.createDirectories(dir.resolve("moquette")));
             SimTcpServer sim = new SimTcpServer(meter, 0);
             Tap tap = new Tap(broker.url(), "zbin/pinned/state", "zbin/pinned/decision")) {
            Path cfg = TestLine.write(dir, "pinned", broker.url(), sim.port(), "pin_cpu: " + cpu + "\n");
            ProcessBuilder pb = new ProcessBuilder("java", "-jar", Jar.path(), "run", "--config", cfg.toString())
                    .redirectErrorStream(true).redirectOutput(dir.resolve("daemon.log").toFile());
            pb.environment().put("ZBIN_LOG_LEVEL", "INFO");
            daemon = pb.start();
            tap.await(m -> m.topic().endsWith("/state") && m.json().path("mode").asText().equals("ready"), 1, 60_000);
            for (int seq = 1; seq <= 20; seq++) {
                var d = tap.present("pinned", seq);
                if (!d.path("reason").asText().equals("stale-trigger")) assertEquals("J", d.path("grade").asText(), d.toString());
            }
            List<String> threads = threadsOf(daemon.pid());
            assertTrue(threads.size() > 10, "a JVM has its threads: " + threads);
            // the JIT compiler's threads on the other CPUs this process may use (none: with the line), every other thread on the line's
            String others = CpuPin.othersThan(cpu);
            List<String> compiler = threads.stream().filter(t -> t.contains("CompilerThre")).toList();
            assertFalse(compiler.isEmpty(), "the JVM's compiler threads are among them: " + threads);
            List<String> elsewhere = threads.stream().filter(t -> !t.contains("CompilerThre") && !t.endsWith("=" + cpu)).toList();
            assertEquals(List.of(), elsewhere, "threads not on CPU " + cpu + " alone, of " + threads);
            for (String t : compiler) {
                String list = t.substring(t.lastIndexOf('=') + 1);
                if (others == null) assertEquals(Integer.toString(cpu), list, t + ": this process has no other CPU, the compiler stays with the line");
                else assertFalse(CpuPin.allows(list, cpu), t + ": a compiler thread keeps off the line's CPU " + cpu + " (others: " + others + ")");
            }
            assertTrue(threads.stream().anyMatch(t -> t.startsWith("MQTT Call")), "the MQTT client's threads are among them: " + threads);
            String log = Files.readString(dir.resolve("daemon.log"));
            assertTrue(log.contains("threads of the line on CPU " + cpu + " from now on") && (others == null || log.contains("compiler threads on CPUs " + others)),
                    "the log says so: " + log);
            Cli check = Cli.run("check", "--config", cfg.toString());
            assertEquals(0, check.exit(), check.out() + check.err());
            assertTrue(check.out().contains("from ready on, the line's threads run on CPU " + cpu + " only")
                            && (others == null || check.out().contains("the JIT compiler's on CPUs " + others)) && !check.out().contains("warning: pin_cpu"),
                    check.out());
        } finally {
            if (daemon != null) daemon.destroyForcibly().waitFor(10, TimeUnit.SECONDS);
        }
    }

    @Test
    void aCpuThisMachineDoesNotOffer_runRefusesTheConfigNamingTheKey_checkWarns() throws Exception {
        int absent = absentCpu();
        Path cfg = TestLine.write(dir, "elsewhere", "tcp://127.0.0.1:1", 1, "pin_cpu: " + absent + "\n");
        Cli run = Cli.run("run", "--config", cfg.toString());
        assertEquals(2, run.exit(), run.out() + run.err());
        assertTrue(run.err().contains(cfg.toString()) && run.err().contains("pin_cpu") && run.err().contains("CPU " + absent + " is not one this process may run on"),
                run.err());
        Cli check = Cli.run("check", "--config", cfg.toString());
        assertEquals(0, check.exit(), check.out() + check.err());
        assertTrue(check.out().contains("warning: pin_cpu: CPU " + absent + " is not one this process may run on"), check.out());
    }

    /** A CPU number this process may not run on. */
    static int absentCpu() {
        String here = CpuPin.allowedHere();
        for (int c = net.zbin.io.LineConfig.MAX_CPU; c >= 0; c--) if (!CpuPin.allows(here, c)) return c;
        throw new AssertionError("this process may run on every CPU number: " + here);
    }
}
