package net.zbin.app;

import java.io.PrintWriter;
import java.util.concurrent.Callable;
import net.zbin.io.mqtt.NoDelaySockets;
import net.zbin.sim.HandlerSim;
import net.zbin.sim.PartLoader;
import net.zbin.sim.Scenario;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;

/** {@code zbin sim handler}: the handler simulator against a running line. */
@Command(name = "handler", mixinStandardHelpOptions = true, sortOptions = false,
        description = {"Feed a simulated lot to a running line and check every answer.",
                "With --meter-sim the parts are put on the meter simulator's contacts (zbin sim meter)."})
public final class SimHandlerCommand implements Callable<Integer> {
    @Option(names = "--broker", required = true, paramLabel = "URL", description = "e.g. tcp://127.0.0.1:1883")
    String broker;
    @Option(names = "--line", required = true, paramLabel = "ID", description = "line id")
    String line;
    @Option(names = "--topic-root", defaultValue = "zbin", description = "topic root (default ${DEFAULT-VALUE})")
    String root;
    @picocli.CommandLine.Mixin
    LotOptions lot;
    @picocli.CommandLine.Mixin
    RateOption pace;
    @Option(names = "--meter-sim", paramLabel = "HOST:PORT", description = "meter simulator to load parts into")
    String meterSim;
    @Option(names = "--deadline", paramLabel = "MS", description = "decision deadline (default: the scenario's)")
    Integer deadline;
    @Option(names = "--check-every", paramLabel = "N", description = "open/short/reference checks every N parts (default: the scenario's)")
    Integer checkEvery;
    @Option(names = "--repeat-every", defaultValue = "0", paramLabel = "N", description = "send every N-th trigger twice (default ${DEFAULT-VALUE})")
    int repeatEvery;
    @Option(names = "--username", description = "MQTT user") String username;
    @Option(names = "--password-env", paramLabel = "VAR", description = "environment variable holding the MQTT password") String passwordEnv;

    @picocli.CommandLine.Spec
    picocli.CommandLine.Model.CommandSpec spec;

    @Override
    public Integer call() throws Exception {
        if (!broker.matches("(tcp|ssl)://[^/:]+:\\d{1,5}"))
            throw new UsageException("--broker must be tcp://host:port or ssl://host:port (was '" + broker + "')");
        Scenario sc = lot.scenario();
        double rate = pace.perSecond();
        PartLoader loader = PartLoader.direct(new net.zbin.sim.Contacts());
        if (meterSim != null) {
            String[] hp = meterSim.split(":");
            if (hp.length != 2 || !hp[1].matches("\\d{1,5}")) throw new UsageException("--meter-sim must be HOST:PORT (was '" + meterSim + "')");
            loader = PartLoader.remote(hp[0], Integer.parseInt(hp[1]));
        }
        char[] pw = null;
        if (passwordEnv != null) {
            String v = System.getenv(passwordEnv);
            if (v == null) throw new UsageException("--password-env: " + passwordEnv + " is not set");
            pw = v.toCharArray();
        }
        int dl = deadline != null ? deadline : sc.handler().deadlineMs();
        HandlerSim.Options o = new HandlerSim.Options(broker, root, line, lot.parts, rate, dl, Math.max(2000, 10 * dl),
                checkEvery != null ? checkEvery : sc.handler().checkEvery(), repeatEvery, 3,
                "zbin-handler-sim-" + ProcessHandle.current().pid(), NoDelaySockets.plain(), username, pw, 30_000);
        PrintWriter out = spec.commandLine().getOut();
        try (HandlerSim h = new HandlerSim(o, sc, loader)) {
            HandlerSim.Summary s = h.run(Progress.line(out));
            Progress.end(out);
            Summaries.print(out, s);
            return s.missing() == 0 && s.duplicate() == 0 && s.contradictory() == 0 && s.stale() == 0 ? Main.EXIT_OK : Main.EXIT_RUNTIME;
        }
    }
}
