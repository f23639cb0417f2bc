package net.zbin.app;

import java.nio.file.Path;
import java.time.Clock;
import java.util.concurrent.Callable;
import java.util.concurrent.CountDownLatch;
import net.zbin.app.daemon.Daemon;
import net.zbin.io.LineConfig;
import net.zbin.io.LineConfigLoader;
import net.zbin.io.meter.ProfileMeterSession;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;

/** {@code zbin run}: the daemon against a real broker and meter, until SIGTERM or Ctrl-C. */
@Command(name = "run", mixinStandardHelpOptions = true,
        description = {"Run the sorting daemon for one line: answer every trigger with a bin, log every decision.",
                "Stops cleanly on SIGTERM/Ctrl-C (state offline, record log flushed)."})
public final class RunCommand implements Callable<Integer> {
    private static final Logger LOG = LoggerFactory.getLogger(RunCommand.class);

    @Option(names = "--config", required = true, paramLabel = "FILE", description = "line config")
    Path config;
    @Option(names = "--connect-timeout", defaultValue = "30000", paramLabel = "MS", description = "wait this long for the broker at start (default ${DEFAULT-VALUE})")
    long connectTimeoutMs;

    @picocli.CommandLine.Spec
    picocli.CommandLine.Model.CommandSpec spec;

    /** The whole cause chain in one line: a TLS refusal says which certificate check failed, not just "MqttException". */
    static String why(Throwable e) {
        StringBuilder b = new StringBuilder();
        java.util.Set<Throwable> seen = new java.util.HashSet<>();
        for (Throwable t = e; t != null && seen.add(t); t = t.getCause()) {
            String m = t.getMessage();
            if (m == null || m.isBlank() || b.indexOf(m) >= 0) continue;
            if (b.length() > 0) b.append(": ");
            b.append(m);
        }
        return b.length() == 0 ? e.toString() : b.toString();
    }

    /**
     * An {@link Error} in any thread (out of memory in the MQTT receive thread, say) ends the process at once: a
     * daemon that has lost a thread may be deaf while its state says ready. The broker then publishes the Will
     * (offline) and the service manager starts it again.
     */
    static void haltOnFatalErrors() {
        Thread.setDefaultUncaughtExceptionHandler((t, e) -> {
            if (e instanceof Error) {
                try {
                    System.err.println("zbin: fatal error in thread " + t.getName() + ": " + e + "; stopping at once");
                    System.err.flush();
                } finally {
                    Runtime.getRuntime().halt(Main.EXIT_RUNTIME);
                }
            }
            LOG.error("uncaught exception in thread {}", t.getName(), e);
        });
    }

    @Override
    public Integer call() throws Exception {
        haltOnFatalErrors();
        LineConfig cfg = LineConfigLoader.load(config);
        String notHere = cfg.pinCpu() == null ? null : net.zbin.app.daemon.CpuPin.problem(cfg.pinCpu());
        if (notHere != null) throw new net.zbin.io.ConfigException(cfg.file(), "pin_cpu", notHere);
        Daemon d = new Daemon(cfg, ProfileMeterSession.open(cfg.meter(), Clock.systemUTC()), Clock.systemUTC()).compilerYieldsAtReady();
        if (cfg.pinCpu() != null) d.pinnedAtReady(cfg.pinCpu());
        CountDownLatch stopped = new CountDownLatch(1);
        Runtime.getRuntime().addShutdownHook(new Thread(() -> {
            d.close();
            stopped.countDown();
        }, "zbin-stop"));
        try {
            d.start(connectTimeoutMs);
        } catch (org.eclipse.paho.client.mqttv3.MqttException e) {
            spec.commandLine().getErr().println("zbin: cannot connect to " + cfg.mqtt().broker() + ": " + why(e));
            return Main.EXIT_RUNTIME;
        } catch (java.net.BindException e) {
            spec.commandLine().getErr().println("zbin: " + cfg.file() + ": status.listen: cannot listen on " + cfg.status().host() + ":"
                    + cfg.status().port() + ": " + e.getMessage());
            return Main.EXIT_RUNTIME;
        } catch (net.zbin.io.LineLock.Taken e) {
            spec.commandLine().getErr().println("zbin: " + e.getMessage());
            return Main.EXIT_RUNTIME;
        }
        spec.commandLine().getOut().println("zbin: line " + cfg.line() + " running on " + cfg.mqtt().broker() + " (" + d.topics().base() + "…)");
        if (d.statusUrl() != null) spec.commandLine().getOut().println("zbin: status page " + d.statusUrl()
                + ", metrics at /metrics");
        spec.commandLine().getOut().flush();
        LOG.info("running; stop with SIGTERM");
        stopped.await();
        return Main.EXIT_OK;
    }
}
