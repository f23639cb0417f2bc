package net.zbin.app;

import java.nio.file.Path;
import java.time.Clock;
import java.util.Map;
import java.util.TreeMap;
import net.zbin.sim.Contacts;
import net.zbin.sim.Scenario;
import net.zbin.sim.SimMeter;
import net.zbin.sim.SimTcpServer;

/**
 * The line {@link LineBench} measures: a meter simulator on TCP in the bench's JVM and the real daemon, either in the
 * bench's JVM ({@link LineRig}) or as {@code zbin run} in a process of its own, started as the systemd unit starts it.
 * In the bench's JVM the daemon shares its compiler, collector and safepoints with the handler's client, the meter
 * simulator and the floor's clients; as its own process it runs as deployed.
 */
interface LineUnderBench extends AutoCloseable {
    /** The meter's contacts, where the bench loads the part. */
    Contacts contacts();

    int meterPort();

    /** The daemon's CPU time so far, ns (threads of the daemon's own, or its whole process). */
    long cpuNs() throws java.io.IOException;

    /** The same split by {@link LineBench#daemonGroup}-like groups (measuring, mqtt_client, other): {total ns, user ns}. */
    Map<String, long[]> cpuByGroup() throws java.io.IOException;

    /** Voluntary thread switches of the daemon's threads so far. */
    long switches() throws java.io.IOException;

    /** Whether the daemon's threads share the bench's JVM (the rest of that JVM's CPU is then the rig's without them). */
    boolean inBenchJvm();

    /** Where the daemon runs, for the results. */
    String where();

    @Override
    void close();

    /** Where the daemon runs: {@code zbin.bench.line.daemon}, {@code jvm} (the default) or {@code process}. */
    String HOW = System.getProperty("zbin.bench.line.daemon", "jvm");

    /** The line {@link #HOW} says, started and ready. */
    static LineUnderBench start(Path dir, String broker, Integer flushMs) throws Exception {
        Scenario sc = LineRig.quietMeter(Scenario.builtIn());
        return switch (HOW) {
            case "jvm" -> new InJvm(new LineRig(dir, "bench", broker, sc, "mlcc-x7r-100n", "handler: {deadline_ms: 150}\n", null, new Contacts(), flushMs));
            case "process" -> new OwnProcess(dir, broker, sc, flushMs, FreshStartBench.PIN_CPU);
            default -> throw new IllegalArgumentException("zbin.bench.line.daemon: '" + HOW + "' is not one of process, jvm");
        };
    }

    /** The daemon in the bench's JVM. */
    final class InJvm implements LineUnderBench {
        private final LineRig rig;

        InJvm(LineRig rig) { this.rig = rig; }

        public Contacts contacts() { return rig.contacts; }

        public int meterPort() { return rig.meterServer.port(); }

        public long cpuNs() { return LineBench.daemonCpuNs(); }

        public Map<String, long[]> cpuByGroup() { return LineBench.daemonCpuByGroup(); }

        public long switches() throws java.io.IOException { return LineBench.switches(ProcessHandle.current().pid(), LineBench::daemonTask); }

        public boolean inBenchJvm() { return true; }

        public String where() { return "in the bench's JVM"; }

        public void close() { rig.close(); }
    }

    /** {@code zbin run} as its own process, with the unit's JVM options and, where one is known, {@code pin_cpu}. */
    final class OwnProcess implements LineUnderBench {
        private final Contacts contacts = new Contacts();
        private final SimTcpServer meterServer;
        private final Process daemon;
        private final Integer pinCpu;

        OwnProcess(Path dir, String broker, Scenario sc, Integer flushMs, Integer pinCpu) throws Exception {
            this.pinCpu = pinCpu;
            SimMeter meter = new SimMeter(contacts, sc.fixture().toFixture(), Clock.systemUTC(), sc.seed(), 0, sc.meterFaults().toRandomFaults());
            meterServer = new SimTcpServer(meter, 0);
            Path cfg = TestLine.write(dir, "bench", broker, meterServer.port(), "handler: {deadline_ms: 150}\n"
                    + (pinCpu == null ? "" : "pin_cpu: " + pinCpu + "\n"), flushMs);
            Process p = null;
            try (Tap tap = new Tap(broker, "zbin/bench/state")) {
                p = UnitProcess.start(dir, cfg, "bench", "unit", null);
                FreshStartBench.awaitReady(tap, 0);
            } catch (Exception | Error e) {
                if (p != null) UnitProcess.stop(p);
                meterServer.close();
                throw e;
            }
            daemon = p;
        }

        public Contacts contacts() { return contacts; }

        public int meterPort() { return meterServer.port(); }

        public long cpuNs() throws java.io.IOException { return LineBench.processCpuNs(daemon.pid()); }

        public Map<String, long[]> cpuByGroup() throws java.io.IOException {
            Map<String, long[]> out = new TreeMap<>();
            LineBench.threadCpuNs(daemon.pid(), (comm, totalUser) -> {
                long[] g = out.computeIfAbsent(comm.startsWith("line-") ? "measuring" : comm.startsWith("MQTT ") ? "mqtt_client" : "other",
                        k -> new long[2]);
                g[0] += totalUser[0];
                g[1] += totalUser[1];
            });
            return out;
        }

        public long switches() throws java.io.IOException { return LineBench.switches(daemon.pid(), c -> true); }

        public boolean inBenchJvm() { return false; }

        public String where() {
            return "its own process (zbin run with the systemd unit's java options" + (pinCpu == null ? "" : ", pin_cpu " + pinCpu) + ")";
        }

        public void close() {
            try {
                UnitProcess.stop(daemon);
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
            } finally {
                meterServer.close();
            }
        }
    }
}
