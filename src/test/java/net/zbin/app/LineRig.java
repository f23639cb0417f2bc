package net.zbin.app;

import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.util.List;
import java.util.stream.Stream;
import net.zbin.app.daemon.Daemon;
import net.zbin.io.LineConfig;
import net.zbin.io.LineConfigLoader;
import net.zbin.io.meter.ProfileMeterSession;
import net.zbin.io.mqtt.NoDelaySockets;
import net.zbin.sim.Contacts;
import net.zbin.sim.HandlerSim;
import net.zbin.sim.PartLoader;
import net.zbin.sim.Scenario;
import net.zbin.sim.SimMeter;
import net.zbin.sim.SimTcpServer;

/** One line under test: a simulated meter on TCP, a line config in a temp folder, and the real daemon. */
public class LineRig implements AutoCloseable {
    public final String line;
    public final Scenario scenario;
    public final Contacts contacts;
    public final SimMeter meter;
    public final SimTcpServer meterServer;
    public final Path dir;
    public final LineConfig cfg;
    public final Daemon daemon;
    private boolean closed;

    public LineRig(Path dir, String line, String broker, Scenario sc, String recipe, String extra) throws Exception {
        this(dir, line, broker, sc, recipe, extra, null);
    }

    /** @param mqttTail replaces the end of the mqtt mapping ("topic_root: zbin}") to add login settings, or null */
    public LineRig(Path dir, String line, String broker, Scenario sc, String recipe, String extra, String mqttTail) throws Exception {
        this(dir, line, broker, sc, recipe, extra, mqttTail, new Contacts());
    }

    /** @param contacts the meter's contacts, shared with a handler simulator made before the rig */
    public LineRig(Path dir, String line, String broker, Scenario sc, String recipe, String extra, String mqttTail, Contacts contacts)
            throws Exception {
        this(dir, line, broker, sc, recipe, extra, mqttTail, contacts, TestLine.FLUSH_MS);
    }

    /** @param flushMs the record log's {@code flush_ms}, null for the shipped default ({@link TestLine#write}) */
    public LineRig(Path dir, String line, String broker, Scenario sc, String recipe, String extra, String mqttTail, Contacts contacts,
                   Integer flushMs) throws Exception {
        this.contacts = contacts;
        this.line = line;
        this.scenario = sc;
        this.dir = dir;
        meter = new SimMeter(contacts, sc.fixture().toFixture(), Clock.systemUTC(), sc.seed(), 0, sc.meterFaults().toRandomFaults());
        meterServer = new SimTcpServer(meter, 0);
        Path cfgFile = TestLine.write(dir, line, broker, meterServer.port(), extra, flushMs);
        String text = Files.readString(cfgFile).replace("active: mlcc-x7r-100n", "active: " + recipe);
        if (mqttTail != null) text = text.replace("topic_root: zbin}", mqttTail);
        Files.writeString(cfgFile, text);
        cfg = LineConfigLoader.load(cfgFile);
        daemon = new Daemon(cfg, ProfileMeterSession.open(cfg.meter(), Clock.systemUTC()), Clock.systemUTC());
        daemon.start(10_000);
    }

    /** Captures open and short through the daemon's command topic, as an engineer would. */
    public void compensate() throws Exception {
        try (Engineer e = new Engineer(cfg.mqtt().broker(), daemon.topics())) {
            contacts.open();
            e.command("{\"cmd\":\"compensate\",\"kind\":\"open\"}");
            contacts.shortBar();
            e.command("{\"cmd\":\"compensate\",\"kind\":\"short\"}");
        }
    }

    public HandlerSim.Summary runHandler(long parts, double rate, int checkEvery, int repeatEvery) throws Exception {
        HandlerSim.Options o = new HandlerSim.Options(cfg.mqtt().broker(), "zbin", line, parts, rate, 150, 5000, checkEvery, repeatEvery, 3,
                "handler-" + line + "-" + System.nanoTime(), NoDelaySockets.plain(), null, null, 10_000);
        try (HandlerSim h = new HandlerSim(o, scenario, PartLoader.direct(contacts))) {
            return h.run(p -> { });
        }
    }

    public List<Path> recordFiles() throws Exception {
        try (Stream<Path> s = Files.list(cfg.records().dir())) {
            return s.sorted().toList();
        }
    }

    /** Stops the daemon (idempotent), then the meter. */
    @Override
    public void close() {
        if (closed) return;
        closed = true;
        daemon.close();
        meterServer.close();
    }

    /**
     * A simulated meter of the built-in scenario without faults, one 100 nF capacitor (2 % off, D 0.01) on its contacts:
     * every part presented reads as that one.
     */
    public static SimMeter oneCapacitorMeter() {
        Scenario sc = quietMeter(Scenario.builtIn());
        Contacts contacts = new Contacts();
        contacts.load(new net.zbin.sim.PartModel.Capacitor(100e-9, 0.02, 0, 0.01), 0);
        return new SimMeter(contacts, sc.fixture().toFixture(), Clock.systemUTC(), sc.seed(), 0, SimMeter.RandomFaults.NONE);
    }

    /** A scenario like the built-in one but without meter faults, so every reading is a reading. */
    public static Scenario quietMeter(Scenario s) {
        return new Scenario(s.scenario(), s.description(), s.seed(), s.lot(), s.part(), s.fixture(), s.contact(),
                new Scenario.MeterFaults(0, 0, 0), s.handler());
    }
}
