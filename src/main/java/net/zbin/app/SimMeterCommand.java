package net.zbin.app;

import java.nio.file.Path;
import java.time.Clock;
import java.util.concurrent.Callable;
import java.util.concurrent.CountDownLatch;
import net.zbin.sim.Contacts;
import net.zbin.sim.Scenario;
import net.zbin.sim.SimMeter;
import net.zbin.sim.SimSerialEndpoint;
import net.zbin.sim.SimTcpServer;
import picocli.CommandLine.ArgGroup;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;

/** {@code zbin sim meter}: the simulated impedance meter on a TCP port or a serial device. */
@Command(name = "meter", mixinStandardHelpOptions = true, sortOptions = false,
        description = {"Serve the simulated impedance meter until stopped (Ctrl-C).",
                "Its fixture and fault rates come from the scenario; parts are put on its contacts with",
                "SIM:LOAD commands (the handler simulator does this). Profile: config/meters/zbin-sim.yaml."})
public final class SimMeterCommand implements Callable<Integer> {
    @ArgGroup(exclusive = true, multiplicity = "1")
    Link link;

    static final class Link {
        @Option(names = "--tcp", paramLabel = "PORT", description = "listen on 127.0.0.1:PORT (0: a free port, printed)") Integer tcp;
        @Option(names = "--serial", paramLabel = "PATH", description = "serve on this serial device (e.g. one end of a socat pty pair)") Path serial;
    }

    @Option(names = "--baud", defaultValue = "115200", description = "serial speed (default ${DEFAULT-VALUE})")
    int baud;
    @Option(names = "--scenario", paramLabel = "FILE", description = "scenario file (default: the built-in one)")
    Path scenarioFile;
    @Option(names = "--time-scale", defaultValue = "1.0", paramLabel = "X",
            description = "multiply the stated measurement time actually waited (0: answer at once; default ${DEFAULT-VALUE})")
    double timeScale;

    @picocli.CommandLine.Spec
    picocli.CommandLine.Model.CommandSpec spec;

    @Override
    public Integer call() throws Exception {
        Scenario sc = Scenarios.load(scenarioFile);
        if (!(timeScale >= 0) || timeScale > 1000) throw new UsageException("--time-scale must be 0..1000 (was " + timeScale + ")");
        if (link.tcp != null && (link.tcp < 0 || link.tcp > 65535))
            throw new UsageException("--tcp must be a port 0..65535 (was " + link.tcp + ")");
        if (link.serial != null && !java.nio.file.Files.exists(link.serial))
            throw new UsageException("--serial: no device " + link.serial);
        SimMeter meter = new SimMeter(new Contacts(), sc.fixture().toFixture(), Clock.systemUTC(), sc.seed(), timeScale,
                sc.meterFaults().toRandomFaults());
        var out = spec.commandLine().getOut();
        AutoCloseable server;
        if (link.tcp != null) {
            SimTcpServer s;
            try {
                s = new SimTcpServer(meter, link.tcp);
            } catch (java.net.BindException e) {
                throw new UsageException("--tcp " + link.tcp + ": cannot listen on 127.0.0.1:" + link.tcp + " (" + e.getMessage()
                        + "; is another meter simulator running? --tcp 0 picks a free port)");
            }
            out.println("sim meter (" + sc.scenario() + ") listening on 127.0.0.1:" + s.port());
            server = s;
        } else {
            server = new SimSerialEndpoint(meter, link.serial.toString(), baud);
            out.println("sim meter (" + sc.scenario() + ") serving " + link.serial + " at " + baud + " baud");
        }
        out.flush();
        CountDownLatch stop = new CountDownLatch(1);
        Runtime.getRuntime().addShutdownHook(new Thread(() -> {
            try {
                server.close();
            } catch (Exception ignored) {
                // shutting down
            }
            stop.countDown();
        }));
        stop.await();
        return Main.EXIT_OK;
    }
}
