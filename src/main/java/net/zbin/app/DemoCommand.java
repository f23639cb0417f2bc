package net.zbin.app;

import java.io.IOException;
import java.io.InputStream;
import java.io.PrintWriter;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.util.List;
import java.util.Locale;
import java.util.concurrent.Callable;
import com.fasterxml.jackson.databind.node.ObjectNode;
import net.zbin.app.daemon.Daemon;
import net.zbin.app.report.Shown;
import net.zbin.core.PartType;
import net.zbin.core.Recipe;
import net.zbin.io.LineConfig;
import net.zbin.io.Json;
import net.zbin.io.LineConfigLoader;
import net.zbin.io.Yaml;
import net.zbin.io.meter.ProfileMeterSession;
import net.zbin.io.mqtt.NoDelaySockets;
import net.zbin.sim.Contacts;
import net.zbin.sim.HandlerSim;
import net.zbin.sim.PartLoader;
import net.zbin.sim.Scenario;
import net.zbin.sim.SimMeter;
import net.zbin.sim.SimTcpServer;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;

/**
 * {@code zbin demo}: zero setup. An embedded broker, the meter simulator over a real TCP link, the
 * real daemon and the handler simulator, all talking through the broker. The fixture is compensated
 * first through the daemon's command topic, then a lot runs with a live progress line.
 */
@Command(name = "demo", mixinStandardHelpOptions = true, sortOptions = false,
        description = {"Run a whole simulated line on this machine: broker, meter simulator, daemon, handler simulator.",
                "Needs nothing but Java. Prints a live progress line and a summary; keeps the record log for replay."})
public final class DemoCommand implements Callable<Integer> {
    @picocli.CommandLine.Mixin
    LotOptions lot;
    @picocli.CommandLine.Mixin
    RateOption pace;
    @Option(names = "--out", paramLabel = "DIR", description = "folder for config, state and records (default: a new temp folder)")
    Path out;
    @Option(names = "--recipe", paramLabel = "NAME", description = "a shipped recipe for the scenario's part (default: the first that fits)")
    String recipeName;
    @Option(names = "--status", defaultValue = "127.0.0.1:8080", paramLabel = "HOST:PORT",
            description = "serve the line's status page here (default ${DEFAULT-VALUE}; a busy port: any free one; 'off': none)")
    String statusListen;
    @Option(names = "--stay", description = "after the lot, keep the line and its status page up until Ctrl-C")
    boolean stay;
    @Option(names = "--time-scale", defaultValue = "0.3", paramLabel = "X",
            description = "multiply the simulated meter's stated measurement time actually waited (0: answer at once; default ${DEFAULT-VALUE})")
    double timeScale;

    @picocli.CommandLine.Spec
    picocli.CommandLine.Model.CommandSpec spec;

    @Override
    public Integer call() throws Exception {
        Scenario sc = lot.scenario();
        if (!(timeScale >= 0) || timeScale > 1000) throw new UsageException("--time-scale must be 0..1000 (was " + timeScale + ")");
        double rate = pace.perSecond();
        long parts = lot.parts;
        Path dir = out != null ? Files.createDirectories(out) : Files.createTempDirectory("zbin-demo-");
        unpackConfig(dir);
        String recipe = recipeName == null ? recipeFor(sc, dir.resolve("recipes")) : fitting(sc, dir.resolve("recipes"), recipeName);
        PrintWriter o = spec.commandLine().getOut();
        Contacts contacts = new Contacts();
        SimMeter meter = new SimMeter(contacts, sc.fixture().toFixture(), Clock.systemUTC(), sc.seed(), timeScale,
                sc.meterFaults().toRandomFaults());
        meter.noiseFactor(sc.meterFaults().noise());
        try (EmbeddedBroker broker = new EmbeddedBroker(Files.createDirectories(dir.resolve("broker")));
             SimTcpServer meterServer = new SimTcpServer(meter, 0)) {
            Path cfgFile = dir.resolve("line.yaml");
            ObjectNode lineCfg = lineConfig(sc, broker.url(), meterServer.port(), recipe);
            String token = null;
            if (!statusListen.equals("off")) {
                token = operatorToken(dir);
                lineCfg.putObject("status").put("listen", freeOrAny(statusListen)).put("operators_file", "operators.yaml");
            }
            // a plan that reads milliohms at a later step (ESR) needs a fixture whose short check is finer than the part
            Recipe active = net.zbin.io.RecipeLoader.load(dir.resolve("recipes").resolve(recipe + ".yaml"));
            double lowest = Double.POSITIVE_INFINITY;
            for (var st : active.steps()) lowest = Math.min(lowest, active.partType().idealZOhm(active.nominal(), st.test().freqHz()));
            if (lowest < net.zbin.core.FixtureBounds.MARGIN * net.zbin.core.FixtureBounds.DEFAULT.shortBandOhm())
                lineCfg.putObject("fixture").put("short_check_ohm", lowest / (2 * net.zbin.core.FixtureBounds.MARGIN));
            Files.write(cfgFile, Yaml.mapper().writeValueAsBytes(lineCfg));
            LineConfig cfg = LineConfigLoader.load(cfgFile);
            o.printf(Locale.ROOT, "zbin demo: %s%n  broker %s, meter simulator on 127.0.0.1:%d, recipe %s, lot %s, %d parts at up to %.0f/s%n",
                    sc.description(), broker.url(), meterServer.port(), recipe, sc.lot().id(), parts, rate);
            o.flush();
            HandlerSim.Summary s;
            Daemon daemon = new Daemon(cfg, ProfileMeterSession.open(cfg.meter(), Clock.systemUTC()), Clock.systemUTC());
            try {
                daemon.start(10_000);
                if (daemon.statusUrl() != null) {
                    o.println("  status page " + daemon.statusUrl() + " (metrics at /metrics); to act from it, sign in with the token " + token);
                    o.flush();
                }
                try (Engineer eng = new Engineer(cfg.mqtt().broker(), daemon.topics())) {
                    contacts.open();
                    o.println("  " + eng.command("{\"cmd\":\"compensate\",\"kind\":\"open\"}"));
                    contacts.shortBar();
                    o.println("  " + eng.command("{\"cmd\":\"compensate\",\"kind\":\"short\"}"));
                    o.println("  " + eng.command("{\"cmd\":\"lot\",\"lot\":\"" + sc.lot().id() + "\"}"));
                }
                int dl = sc.handler().deadlineMs();
                HandlerSim.Options opts = new HandlerSim.Options(broker.url(), "zbin", "demo", parts, rate, dl, Math.max(3000, 10 * dl),
                        sc.handler().checkEvery(), 97, 3, "zbin-demo-handler", NoDelaySockets.plain(), null, null, 10_000);
                try (HandlerSim h = new HandlerSim(opts, sc, PartLoader.direct(contacts))) {
                    s = h.run(Progress.line(o));
                }
                if (stay) {
                    Progress.end(o);
                    Summaries.print(o, s); // the handler's account of the lot before the wait (the page shows the line's own figures)
                    o.println("  the lot is done; the line and its page stay up until Ctrl-C");
                    o.flush();
                    new java.util.concurrent.CountDownLatch(1).await();
                }
            } finally {
                daemon.close();
            }
            Progress.end(o);
            Summaries.print(o, s);
            var lotFigures = daemon.lotFigures();
            o.printf(Locale.ROOT, "  the line's own figures for lot %s: %d parts finished, %d passed, yield %s, %d retests, %d fixture checks%n",
                    sc.lot().id(), lotFigures.parts(), lotFigures.passed(), Shown.of("%.2f %%", lotFigures.yieldPct()), lotFigures.retests(), lotFigures.checks());
            MonitorText.figures(o, daemon.monitorFigures());
            Path history = dir.resolve("state").resolve("alarms-demo.jsonl");
            if (Files.exists(history)) {
                o.println("  alarms during the run:");
                for (String a : Files.readAllLines(history)) {
                    var j = Json.mapper().readTree(a);
                    if (j.has("acknowledged")) {
                        var ack = j.path("acknowledged");
                        o.printf(Locale.ROOT, "    %s %s acknowledged by %s%s%n", ack.path("at").asText(), j.path("code").asText(), ack.path("by").asText(),
                                ack.path("note").asText().isEmpty() ? "" : ": " + ack.path("note").asText());
                        continue;
                    }
                    o.printf(Locale.ROOT, "    %s %s %s: %s%n", j.path("active").asBoolean() ? j.path("since").asText() : "        (cleared)",
                            j.path("code").asText(), j.path("active").asBoolean() ? "raised" : "cleared", j.path("message").asText());
                }
            } else o.println("  alarms during the run: none");
            long[] reread = {0, 0, 0}; // parts decided, of them re-read, readings
            net.zbin.io.RecordLogReader.read(dir.resolve("records"), "demo", java.time.Instant.EPOCH, e -> {
                if (e.decision().kind() != net.zbin.core.Trigger.Kind.PART || e.decision().grading().readings() == 0) return;
                reread[0]++;
                if (e.decision().grading().readings() > 1) reread[1]++;
                reread[2] += e.decision().grading().readings();
            });
            if (reread[1] > 0)
                o.printf(Locale.ROOT, "  re-measured near a limit: %d of %d parts measured (%.2f %%), %.3f readings per part%n", reread[1], reread[0],
                        100.0 * reread[1] / reread[0], (double) reread[2] / reread[0]);
            o.printf(Locale.ROOT, "  record log: %d rows in %s%n", daemon.recordsWritten(), dir.resolve("records"));
            o.printf(Locale.ROOT, "  replay it:  java -jar target/zbin.jar replay --recipe %s --in %s/records/demo-*.csv --line-config %s%n",
                    dir.resolve("recipes").resolve(recipe + ".yaml"), dir, cfgFile);
            boolean clean = s.missing() == 0 && s.duplicate() == 0 && s.contradictory() == 0 && s.stale() == 0;
            o.println(clean ? "demo ok: every trigger got exactly one decision" : "demo: answers were missing, duplicated or contradictory");
            return clean ? Main.EXIT_OK : Main.EXIT_RUNTIME;
        }
    }

    /**
     * The demo's operator: a random token written (mode 600) to operators.yaml beside the line config, so the page's
     * pause, resume and acknowledge can be tried; the page is bound to loopback, so plain HTTP is allowed.
     */
    static String operatorToken(Path dir) throws IOException {
        byte[] b = new byte[18];
        new java.security.SecureRandom().nextBytes(b);
        String token = java.util.Base64.getUrlEncoder().withoutPadding().encodeToString(b);
        Path f = dir.resolve("operators.yaml");
        ObjectNode n = Json.object();
        n.putObject("operators").put("demo-operator", token);
        Files.deleteIfExists(f);
        Files.createFile(f, java.nio.file.attribute.PosixFilePermissions.asFileAttribute(java.nio.file.attribute.PosixFilePermissions.fromString("rw-------")));
        Files.write(f, Yaml.mapper().writeValueAsBytes(n));
        return token;
    }

    /** The address asked for when its port is free (or 0), else the same host with any free port. */
    static String freeOrAny(String listen) throws UsageException {
        net.zbin.io.HostPort at;
        try {
            at = net.zbin.io.HostPort.parse(listen);
        } catch (IllegalArgumentException e) {
            throw new UsageException("--status " + e.getMessage() + " (or off)");
        }
        try (var probe = new java.net.ServerSocket()) {
            probe.bind(new java.net.InetSocketAddress(at.host(), at.port()));
            return at.toString();
        } catch (IOException e) {
            return new net.zbin.io.HostPort(at.host(), 0).toString();
        }
    }

    /** The demo line's config, as a tree: Jackson writes the YAML, so any scenario text is quoted right. */
    static ObjectNode lineConfig(Scenario sc, String brokerUrl, int meterPort, String recipe) {
        ObjectNode n = Json.object();
        n.put("line", "demo");
        n.put("description", sc.description());
        n.putObject("mqtt").put("broker", brokerUrl).put("topic_root", "zbin");
        ObjectNode meter = n.putObject("meter");
        meter.put("profile", "meters/zbin-sim.yaml");
        meter.putObject("transport").putObject("tcp").put("host", "127.0.0.1").put("port", meterPort);
        n.putObject("recipes").put("dir", "recipes").put("active", recipe);
        n.put("state_dir", "state");
        n.putObject("records").put("dir", "records").put("flush_ms", 200);
        n.putObject("handler").put("deadline_ms", sc.handler().deadlineMs());
        n.putObject("dashboard").put("interval_s", 2);
        return n;
    }

    /** Copies the shipped recipes and meter profile out of the jar. */
    static void unpackConfig(Path dir) throws IOException {
        Files.createDirectories(dir.resolve("recipes"));
        Files.createDirectories(dir.resolve("meters"));
        for (String name : List.of("recipes/mlcc-x7r-100n.yaml", "recipes/mlcc-x7r-100n-remeasure.yaml", "recipes/polymer-cap-100u-esr.yaml", "recipes/inductor-pwr-4u7.yaml", "recipes/resistor-prec-4k99.yaml", "recipes/mlcc-c0g-100p.yaml",
                "meters/zbin-sim.yaml")) {
            try (InputStream in = DemoCommand.class.getResourceAsStream("/zbin-config/" + name)) {
                if (in == null) throw new IOException("jar lacks /zbin-config/" + name);
                Files.write(dir.resolve(name), in.readAllBytes());
            }
        }
    }

    /** A named shipped recipe, refused unless it sorts the scenario's part (same type and nominal). */
    static String fitting(Scenario sc, Path recipes, String name) throws Exception {
        List<String> fit = new java.util.ArrayList<>();
        for (Recipe r : Recipes.all(recipes, net.zbin.core.FixtureBounds.DEFAULT))
            if (r.partType() == sc.part().partType() && Math.abs(r.nominal() - sc.part().nominal()) <= 1e-9 * r.nominal()) fit.add(r.name());
        if (!fit.contains(name)) throw new UsageException("--recipe " + name + ": not a shipped recipe for the part of scenario " + sc.scenario()
                + " (these are: " + String.join(", ", fit) + ")");
        return name;
    }

    /** The shipped recipe for the scenario's part (same type and nominal); one that re-measures only when named. */
    static String recipeFor(Scenario sc, Path recipes) throws Exception {
        PartType type = sc.part().partType();
        for (Recipe r : Recipes.all(recipes, net.zbin.core.FixtureBounds.DEFAULT))
            if (!r.remeasure().on() && r.partType() == type && Math.abs(r.nominal() - sc.part().nominal()) <= 1e-9 * r.nominal()) return r.name();
        throw new UsageException("no shipped recipe sorts " + type.withArticle() + " of nominal " + sc.part().nominal()
                + " (scenario " + sc.scenario() + ")");
    }
}
