package net.zbin.app.daemon;

import java.nio.file.Path;
import java.time.Clock;
import java.time.Instant;
import java.util.List;
import java.util.Map;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.RejectedExecutionException;
import java.util.concurrent.ScheduledExecutorService;
import java.util.concurrent.TimeUnit;
import net.zbin.core.Compensation;
import net.zbin.core.Decision;
import net.zbin.core.FaultKind;
import net.zbin.core.FixtureCheck;
import net.zbin.core.Grader;
import net.zbin.core.Grading;
import net.zbin.core.Impedance;
import net.zbin.core.Recipe;
import net.zbin.core.TestConditions;
import net.zbin.core.Trigger;
import net.zbin.io.CompensationStore;
import net.zbin.io.ConfigException;
import net.zbin.io.DecisionJson;
import net.zbin.io.LineConfig;
import net.zbin.io.RecipeLoader;
import net.zbin.io.RecordLog;
import net.zbin.io.meter.CompensationCapture;
import net.zbin.io.meter.MeterException;
import net.zbin.io.meter.MeterReading;
import net.zbin.io.meter.MeterSession;
import net.zbin.io.mqtt.MqttLink;
import net.zbin.io.mqtt.PayloadException;
import net.zbin.io.mqtt.Payloads;
import net.zbin.io.mqtt.Topics;
import net.zbin.io.mqtt.TriggerCodec;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The sorting daemon of one line. Triggers and commands are handed from Paho's thread to one
 * measuring thread, so parts are measured one at a time in arrival order. Per trigger: validate,
 * answer a repeat from the book, measure, grade, publish the decision, then queue the record row
 * and update the figures — the publish waits on neither the disk nor the dashboard.
 */
public final class Daemon implements AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(Daemon.class);

    private final LineConfig cfg;
    private final MeterSession meter;
    private final Clock clock;
    private final Topics topics;
    private final ExecutorService work;
    private final ScheduledExecutorService ticker;
    private final DecisionBook book = new DecisionBook(200_000);
    private final LineStats stats;
    private final RecordLog records;
    private final Map<String, Instant> activeAlarms = new ConcurrentHashMap<>();
    private final LineCommands commands = new LineCommands(this);
    private CompensationStore store;
    /** Compensation at the active recipe's frequency; changes only on the measuring thread. */
    private Compensation comp;
    private MqttLink mqtt;
    private volatile Recipe recipe;
    private volatile String lot = "";
    private boolean operatorPaused, logFailing, linkDown;
    private Mode published = Mode.OFFLINE;
    private Instant modeSince;

    public Daemon(LineConfig cfg, MeterSession meter, Clock clock) throws ConfigException {
        this.cfg = cfg;
        this.meter = meter;
        this.clock = clock;
        this.topics = new Topics(cfg.mqtt().topicRoot(), cfg.line());
        this.stats = new LineStats(clock.instant());
        this.modeSince = clock.instant();
        this.work = Executors.newSingleThreadExecutor(r -> named(r, "line-" + cfg.line()));
        this.ticker = Executors.newSingleThreadScheduledExecutor(r -> named(r, "dashboard-" + cfg.line()));
        this.records = new RecordLog(cfg.records(), cfg.line(), new RecordLog.Listener() {
            public void failed(String message) { logFailed(message); }

            public void recovered() { logRecovered(); }
        });
        this.recipe = RecipeLoader.load(recipeFile(cfg.activeRecipe())).withFixture(cfg.bounds());
        this.store = CompensationStore.load(cfg.stateDir());
        this.comp = store.forFrequency(recipe.freqHz());
    }

    private static Thread named(Runnable r, String name) {
        Thread t = new Thread(r, name);
        t.setDaemon(true);
        return t;
    }

    private Path recipeFile(String name) { return cfg.recipeDir().resolve(name + ".yaml"); }

    public Topics topics() { return topics; }

    /** Connects and starts serving; waits up to {@code connectTimeoutMs} for the broker. */
    public void start(long connectTimeoutMs) throws Exception {
        records.start();
        byte[] will = Payloads.state(false, Mode.OFFLINE.key(), recipe.name(), clock.instant());
        mqtt = new MqttLink(cfg.mqtt(), topics.state(), will, List.of(topics.trigger(), topics.command()), this::route);
        mqtt.onConnect(this::publishStateNow);
        work.execute(this::probeMeter);
        mqtt.connect(connectTimeoutMs);
        long period = cfg.dashboardMs();
        ticker.scheduleAtFixedRate(this::publishDashboard, period, period, TimeUnit.MILLISECONDS);
        LOG.info("line {} serving {} with recipe {}", cfg.line(), topics.base(), recipe.name());
    }

    /** Paho's thread: only hand the message over. */
    private void route(String topic, byte[] payload) {
        long arrived = System.nanoTime();
        try {
            if (topic.equals(topics.trigger())) work.execute(() -> onTrigger(payload, arrived));
            else if (topic.equals(topics.command())) work.execute(() -> commands.handle(payload));
        } catch (RejectedExecutionException e) {
            LOG.debug("stopping: {} dropped", topic);
        }
    }

    private void probeMeter() {
        try {
            meter.apply(recipe.test());
            LOG.info("meter: {}", meter.identify());
            setLinkDown(false, null);
        } catch (MeterException e) {
            LOG.warn("meter not ready: {}", e.getMessage());
            setLinkDown(e.kind() == FaultKind.DISCONNECTED, e.getMessage());
        }
    }

    // ---- triggers -------------------------------------------------------------------------------

    private void onTrigger(byte[] payload, long arrived) {
        Trigger t;
        try {
            t = TriggerCodec.decode(payload);
        } catch (PayloadException e) {
            reject(topics.trigger(), e.getMessage());
            return;
        }
        Decision prior = book.get(t.seq());
        if (prior != null) {
            mqtt.publish(topics.decision(), Payloads.bytes(DecisionJson.encode(prior.asRepeat())), 1, false);
            stats.repeated();
            return;
        }
        int attempt = 0;
        if (t.retestOf() >= 0) {
            Decision first = book.get(t.retestOf());
            attempt = first == null ? 1 : first.attempt() + 1;
        }
        Recipe r = recipe;
        Grading g = decide(t, r, attempt);
        double latencyMs = (System.nanoTime() - arrived) / 1e6;
        String lotId = t.lot().isEmpty() ? lot : t.lot();
        Decision d = new Decision(t.seq(), t.part(), lotId, t.kind().key(), r.name(), g, latencyMs, false, attempt);
        book.put(d);
        mqtt.publish(topics.decision(), Payloads.bytes(DecisionJson.encode(d)), 1, false);
        records.offer(new RecordLog.Row(clock.instant(), cfg.line(), d));
        stats.decided(d, latencyMs > cfg.deadlineMs(), clock.millis());
    }

    private Grading decide(Trigger t, Recipe r, int attempt) {
        Mode m = mode();
        if (m == Mode.PAUSED) return Grader.notMeasured(r, Grader.NOT_MEASURED_PAUSED);
        MeterReading mr;
        try {
            meter.apply(r.test());
            mr = meter.measure();
        } catch (MeterException e) {
            LOG.debug("seq {}: {}", t.seq(), e.getMessage());
            if (e.kind() == FaultKind.DISCONNECTED) {
                boolean wasDown = linkDownNow();
                setLinkDown(true, e.getMessage());
                if (wasDown) return Grader.notMeasured(r, Grader.NOT_MEASURED_FAULTED);
            }
            return Grader.fault(r, e.kind(), attempt);
        }
        if (linkDownNow()) setLinkDown(false, null);
        return switch (t.kind()) {
            case PART -> Grader.grade(r, mr.reading(), comp, attempt);
            case OPEN -> FixtureCheck.open(r, mr.reading(), comp, cfg.checks());
            case SHORT -> FixtureCheck.shortBar(r, mr.reading(), comp, cfg.checks());
            case REFERENCE -> FixtureCheck.reference(r, mr.reading(), comp, attempt);
        };
    }

    void reject(String topic, String reason) {
        stats.rejected();
        mqtt.publish(topics.rejected(), Payloads.rejected(topic, reason), 1, false);
    }

    // ---- what the command handler may do -------------------------------------------------------

    LineConfig config() { return cfg; }

    Recipe recipe() { return recipe; }

    /** Loads a recipe by name from the recipe folder and makes it active. */
    String switchRecipe(String name) throws PayloadException, ConfigException {
        if (name == null) throw new PayloadException("name is missing");
        if (!name.matches("[A-Za-z0-9][A-Za-z0-9._-]{0,63}")) throw new PayloadException("name is not a recipe id: '" + name + "'");
        Path f = recipeFile(name);
        if (!java.nio.file.Files.exists(f)) throw new PayloadException("no recipe '" + name + "' in " + cfg.recipeDir());
        recipe = RecipeLoader.load(f).withFixture(cfg.bounds());
        comp = store.forFrequency(recipe.freqHz());
        publishStateNow();
        return "recipe " + name;
    }

    void setLot(String l) { lot = l; }

    void resetCounters() { stats.reset(clock.instant()); }

    /** Captures compensation through the line's meter; runs on the measuring thread, between parts. */
    List<Impedance> capture(CompensationCapture.Kind k, List<TestConditions> conds, List<Impedance> std)
            throws ConfigException, MeterException, CompensationCapture.ImplausibleException, java.io.IOException {
        List<Impedance> got = new CompensationCapture(meter, cfg.fixture(), clock).capture(k, conds, std, store);
        store = CompensationStore.load(cfg.stateDir());
        comp = store.forFrequency(recipe.freqHz());
        return got;
    }

    void publishResult(String id, String cmd, boolean ok, String message) {
        mqtt.publish(topics.commandResult(), Payloads.commandResult(id, cmd, ok, message), 1, false);
    }

    // ---- mode, state, alarms ---------------------------------------------------------------------

    synchronized Mode mode() {
        if (operatorPaused || (logFailing && cfg.records().pauseOnFailure())) return Mode.PAUSED;
        if (linkDown) return Mode.FAULT;
        return Mode.READY;
    }

    private synchronized boolean linkDownNow() { return linkDown; }

    synchronized void setOperatorPaused(boolean p) {
        operatorPaused = p;
        modeChanged();
    }

    private synchronized void setLinkDown(boolean down, String message) {
        if (down == linkDown) return;
        linkDown = down;
        alarm("meter-link-down", "critical", down, down ? message : "meter link restored");
        modeChanged();
    }

    private synchronized void logFailed(String message) {
        logFailing = true;
        alarm("record-log-failed", "critical", true, message + (cfg.records().pauseOnFailure() ? "; line paused" : "; sorting continues without a record"));
        modeChanged();
    }

    private synchronized void logRecovered() {
        logFailing = false;
        alarm("record-log-failed", "critical", false, "record log writable again");
        modeChanged();
    }

    private void modeChanged() {
        Mode m = mode();
        if (m != published) {
            modeSince = clock.instant();
            publishStateNow();
        }
    }

    private synchronized void publishStateNow() {
        if (mqtt == null) return;
        Mode m = mode();
        published = m;
        mqtt.publish(topics.state(), Payloads.state(true, m.key(), recipe.name(), modeSince), 1, true);
    }

    private void alarm(String code, String severity, boolean active, String message) {
        Instant since = active ? activeAlarms.computeIfAbsent(code, c -> clock.instant()) : activeAlarms.remove(code);
        if (since == null) since = clock.instant();
        if (mqtt != null) mqtt.publish(topics.alarm(), Payloads.alarm(code, severity, active, message, since), 1, false);
        if (active) LOG.warn("alarm {}: {}", code, message);
        else LOG.info("alarm {} cleared: {}", code, message);
    }

    private void publishDashboard() {
        try {
            LineStats.Snapshot s = stats.snapshot(clock.millis());
            mqtt.publish(topics.dashboard(), DashboardJson.encode(cfg.line(), lot, recipe.name(), mode(), s, records.backlog(), records.dropped()), 0, true);
        } catch (RuntimeException e) {
            LOG.warn("dashboard: {}", e.toString());
        }
    }

    public long recordsWritten() { return records.written(); }

    /** Clean stop: finish queued work, publish offline, flush the record log. */
    @Override
    public void close() {
        work.shutdown();
        try {
            if (!work.awaitTermination(10, TimeUnit.SECONDS)) work.shutdownNow();
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
        ticker.shutdownNow();
        if (mqtt != null) {
            publishDashboard();
            mqtt.publishAndWait(topics.state(), Payloads.state(false, Mode.OFFLINE.key(), recipe.name(), clock.instant()), 1, true, 3000);
            mqtt.close();
        }
        records.close();
        meter.close();
        LOG.info("line {} stopped", cfg.line());
    }
}
