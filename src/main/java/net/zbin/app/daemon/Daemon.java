package net.zbin.app.daemon;

import java.time.Clock;
import java.time.Duration;
import java.util.List;
import java.util.concurrent.Executors;
import java.util.concurrent.ScheduledExecutorService;
import java.util.concurrent.TimeUnit;
import net.zbin.io.ConfigException;
import net.zbin.io.FatalErrors;
import net.zbin.io.LineConfig;
import net.zbin.io.LineState;
import net.zbin.io.RecordLog;
import net.zbin.io.RecordLogReader;
import net.zbin.io.meter.MeterSession;
import net.zbin.io.mqtt.MqttLink;
import net.zbin.io.mqtt.Payloads;
import net.zbin.io.mqtt.Topics;
import net.zbin.io.mqtt.TriggerCodec;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The sorting daemon of one line: wiring only. Paho's thread hands triggers and commands to one
 * measuring thread ({@link Dispatch}); the {@link TriggerPath} decides; listeners hear of each decision;
 * a ticker publishes the dashboard and heals the meter link.
 */
public final class Daemon implements AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(Daemon.class);
    private final LineConfig cfg;
    private final MeterSession meter;
    private final Clock clock;
    private final Topics topics;
    private final LineSetup setup;
    private final LineMode mode;
    private final LineStats stats;
    private final RecordLog records;
    private final DecisionBook book;
    private final Dispatch dispatch;
    /**
     * Whether a trigger that finds the line idle is measured on the MQTT client's thread (one thread wake-up less per
     * part): only when the longest a part can take on a meter that stops answering (the handler's deadline for its
     * readings, then one reading's timeouts) is within half the broker keep-alive, since that thread also reads the broker's
     * answers to its pings; and only while the meter link is up and took its setup.
     */
    private final boolean triggersInPlace;
    private final ScheduledExecutorService ticker = Executors.newSingleThreadScheduledExecutor(r -> named(r, "ticker"));
    private final MeterWatch watch;
    private final MonitorListener monitor;
    private MqttLink mqtt;
    private TriggerPath path;
    private final List<net.zbin.io.LineLock> locks = new java.util.ArrayList<>();
    /** True once the record log was read back: only then is the state file this daemon's to write. */
    private volatile boolean recovered;
    /** Guards {@link #warm} and {@link #subscribed}: the first announce comes after both. */
    private final Object startLock = new Object();
    /** The warm-up ran: a (re)connect announces the line's state only then. */
    private boolean warm;
    /** The subscriptions were requested on a connection. */
    private boolean subscribed;
    private LineCommands commands;
    /** The line's status page, when the config asks for one (its own threads; it reads copies only). */
    private final net.zbin.app.status.Boards boards;
    private net.zbin.app.status.StatusServer status;
    /** The snapshot the last dashboard encoded: what {@code /metrics} reports, so a scrape agrees with the dashboard. */
    private volatile LineSnapshot lastSnapshot;
    /** Periodic dashboards published: a finished lot's dashboard sent later is retained only if none came in between. */
    private final java.util.concurrent.atomic.AtomicLong dashboards = new java.util.concurrent.atomic.AtomicLong();
    static final long LOT_END_DASHBOARD_DELAY_MS = 200;
    /**
     * The warm-up's least time bound ({@link #warmUpMs} gives a start with time to spare more). The read-back of the record log, the broker connect and the meter probe run beside it,
     * and the rehearsal beside the rest of it once the broker acknowledged the subscriptions: the rehearsal waits on the
     * broker and the meter most of its time, the warm-up keeps the cores busy meanwhile. Against a 300 ms warm-up followed
     * by the rehearsal (the same time to ready), FreshStartBench counted 783 and 755 of the first 800 decisions within the
     * floor's p99, against 718 and 723 (two runs of each, alternating). Against the rehearsal beside only the warm-up's
     * last 200 ms (starts from the jar with its class-data archive, three runs of each, alternating, the same time to
     * ready): 80, 73 and 78 of the first ten decisions after 8 starts within the floor's p99 against 69, 68 and 76.
     */
    static final long WARM_UP_MS = 500;
    /**
     * A start that leaves time to spare warms up longer: until this long after the process started, at most
     * {@link #WARM_UP_MAX_MS}. The line still says ready within 2 s, and the first parts after it meet code the compiler
     * has caught up with. A start from a class-data archive (the systemd unit's) spares some 0.5 s; a start from class
     * folders (the tests', the benches') little or none, and warms up {@link #WARM_UP_MS}. FreshStartBench with a
     * 1 000 ms warm-up against 500 (two runs of each, alternating, from class folders): 757 and 761 of the first 800
     * decisions within the floor's p99 against 698 and 723, ready 0.45 s later.
     */
    static final long READY_AIM_MS = 1_600;
    static final long WARM_UP_MAX_MS = 1_200;

    /** The warm-up's bound for a process {@code uptimeMs} old when it starts (a daemon inside a longer-lived JVM: the least). */
    static long warmUpMs(long uptimeMs) { return Math.max(WARM_UP_MS, Math.min(WARM_UP_MAX_MS, READY_AIM_MS - uptimeMs)); }
    /** The rehearsal's least time bound: it runs from the broker's acknowledgement of the subscriptions to the warm-up's end, this long at least. */
    static final long REHEARSAL_MS = 200;
    /** Whether {@link #start} lowers the JIT compiler threads' priority once the line is warm ({@link #compilerYieldsAtReady()}). */
    private volatile boolean compilerYieldsAtReady;
    /** The CPU this process keeps to from ready on ({@link #pinnedAtReady}); -1: every CPU. */
    private volatile int pinCpuAtReady = -1;
    /** The start's rehearsal while it runs (Paho's thread hands it its messages), null after. */
    private volatile Rehearsal rehearsal;

    public Daemon(LineConfig cfg, MeterSession meter, Clock clock) throws ConfigException {
        this.cfg = cfg;
        this.meter = meter;
        this.clock = clock;
        this.topics = new Topics(cfg.mqtt().topicRoot(), cfg.line());
        this.setup = new LineSetup(cfg);
        this.mode = new LineMode(clock, topics, cfg.records().pauseOnFailure(), () -> setup.recipe().name(), cfg.monitor().pauseOn(),
                cfg.stateDir().resolve("alarms-" + cfg.line() + ".jsonl"));
        this.monitor = new MonitorListener(cfg, mode, clock, setup.recipe());
        this.stats = new LineStats(clock, cfg.deadlineMs());
        this.book = new DecisionBook(cfg.repeatWindowMs(), 20_000);
        this.records = new RecordLog(cfg.records(), cfg.line(), new RecordLog.Listener() {
            public void failed(String message) { mode.setLogFailing(true, message); }

            public void recovered() { mode.setLogFailing(false, null); }
        });
        this.dispatch = new Dispatch(cfg.line());
        long reading = meter.longestReadingMs(), budget = cfg.mqtt().keepAliveS() * 500L - cfg.deadlineMs();
        this.triggersInPlace = reading <= budget;
        if (!triggersInPlace && reading != Long.MAX_VALUE)
            LOG.info("line {}: triggers go to the measuring thread: the handler's deadline of {} ms and a reading's timeouts of {} ms"
                    + " exceed half the MQTT keep-alive of {} s", cfg.line(), cfg.deadlineMs(), reading, cfg.mqtt().keepAliveS());
        this.watch = new MeterWatch(meter, mode, setup::recipe);
        this.boards = cfg.status() == null ? null : net.zbin.app.status.Boards.of(cfg.line(), clock);
        if (boards != null)
            mode.observe((topic, payload) -> boards.heard(cfg.line(), topic.equals(topics.alarm())
                    ? net.zbin.app.status.Boards.Kind.ALARM : net.zbin.app.status.Boards.Kind.STATE, payload));
    }

    static Thread named(Runnable r, String name) {
        Thread t = new Thread(r, name);
        t.setDaemon(true);
        return t;
    }

    public Topics topics() { return topics; }

    /**
     * Asks {@link #start} to set this JVM's compiler threads to nice 19 just before the line says ready (see
     * {@link CompilerThreads}): for a process that is the line's own ({@code zbin run}), not a JVM that hosts other work.
     */
    public Daemon compilerYieldsAtReady() {
        compilerYieldsAtReady = true;
        return this;
    }

    /**
     * Asks {@link #start} to keep every thread of this process on {@code cpu} from just before the line says ready (see
     * {@link CpuPin}): for a process that is the line's own ({@code zbin run}).
     */
    public Daemon pinnedAtReady(int cpu) {
        if (cpu < 0) throw new IllegalArgumentException("cpu: " + cpu + " is negative");
        pinCpuAtReady = cpu;
        return this;
    }

    /** Recovers from the record log, warms up, connects and serves; waits up to {@code connectTimeoutMs} for the broker. */
    public void start(long connectTimeoutMs) throws Exception {
        lock();
        dispatch.watchStalls(cfg.line());
        monitor.keepLimits(setup.recipe());
        mqtt = new MqttLink(cfg.mqtt(), topics.state(), mode.offline(), List.of(topics.trigger(), topics.command()), this::route);
        dispatch.runIdleMessagesInPlace(mqtt::hasRoom);
        // Connected now, subscribed only when the line can take triggers: a Paho connect waits ~0.3 s on its own threads
        // starting, which passes under reading the record log back and the rest of the start.
        mqtt.holdSubscriptions();
        var connecting = mqtt.connectStart();
        path = new TriggerPath(cfg, topics, setup, meter, mqtt, records, mode, stats, book, List.of(stats, monitor), clock);
        commands = new LineCommands(topics, mqtt, setup, mode, stats, path, meter, clock, monitor, this::saveState);
        // The warm-up (CPU, on scratch copies of everything it touches) runs beside reading the record log back (the two
        // share the figures' and the monitor's code, which each warms for the other), the rest of the start, the meter
        // probe and the broker's connect and subscription (I/O); then the rehearsal runs the real I/O of a part's way;
        // the line says ready only after both, so the first part is measured on a warm path.
        long[] warmed = new long[2];
        long warmUpMs = warmUpMs(java.lang.management.ManagementFactory.getRuntimeMXBean().getUptime());
        Thread warming = named(() -> {
            long w0 = System.nanoTime();
            try {
                // at most 40 per ms, a cap only a warm JVM reaches (a daemon started in the tests' JVM); a fresh process runs
                // 400-2 000 in its time, cold code beside the read-back
                warmed[0] = Warmup.run(cfg, setup, (int) (40 * warmUpMs), warmUpMs);
            } catch (RuntimeException e) { // e.g. a command changed the compensation store under it: the line starts all the same
                LOG.warn("warm-up stopped early: {}", e.toString());
            }
            warmed[1] = (System.nanoTime() - w0) / 1_000_000;
        }, "warm-up");
        long warmStart = System.nanoTime();
        warming.start();
        recover();
        if (cfg.status() != null) startStatus(); // before the broker: a page that cannot listen stops the start, not a running line
        // The finished lot's last figures, retained until the next dashboard: taken on the measuring thread as the lot ends
        // (the tally and counts it ended with, the monitor's figures: references and copies, after the new lot's first
        // answer is out), built into a dashboard, encoded and published by the ticker (no encoding, file or send here).
        // Sent LOT_END_DASHBOARD_DELAY_MS later, so that its encoding and its few kilobytes on the MQTT connection do not
        // hold up the new lot's first decision (they would share the client's sender); retained only if no dashboard of the
        // new lot went out meanwhile.
        path.onLotEnd(ended -> {
            var at = clock.instant();
            var figures = monitor.snapshot(); // the monitor's lot figures start again with the new lot's first decision, next
            long sentBefore = dashboards.get();
            ticker.schedule(FatalErrors.surfaced(() -> {
                try {
                    var node = DashboardJson.encode(snapshot(at, mode.mode(), stats.snapshot(ended), figures));
                    if (boards != null && dashboards.get() == sentBefore) boards.heard(cfg.line(), net.zbin.app.status.Boards.Kind.DASHBOARD, node);
                    mqtt.publish(topics.dashboard(), Payloads.bytes(node), 0, dashboards.get() == sentBefore);
                } catch (RuntimeException e) {
                    LOG.warn("dashboard: {}", e.toString());
                }
            }), LOT_END_DASHBOARD_DELAY_MS, TimeUnit.MILLISECONDS);
        });
        monitor.compensation(setup.compensation(), setup.stepCompensations());
        records.start();
        records.prepare(clock.instant()); // today's file opened now, not at the first part
        long t0 = System.nanoTime();
        mode.attach(mqtt);
        // The state goes out once the broker acknowledged the subscriptions on that connection (also after each
        // reconnect), so a handler that sees "ready" is heard; and only once the path is warm.
        mqtt.onConnect(() -> {
            synchronized (startLock) {
                subscribed = true;
                if (warm) mode.announce();
            }
        });
        watch.probe();
        mqtt.connected(connecting, connectTimeoutMs);
        mqtt.hear();
        // start() returns once a trigger from any client is heard, not when the subscriptions were only requested: a
        // handler (or a test) that publishes right after start would otherwise race the broker's SUBACK
        boolean heard = mqtt.awaitSubscribed(connectTimeoutMs);
        long subscribedMs = (System.nanoTime() - t0) / 1_000_000;
        // the rehearsal from the subscription on, beside the rest of the warm-up (REHEARSAL_MS at least)
        long rehearseMs = Math.max(REHEARSAL_MS, (warmStart + warmUpMs * 1_000_000L - System.nanoTime()) / 1_000_000);
        int rounds = 0;
        long readings = 0;
        if (heard) { // the real I/O of a part's way (broker both ways, hand-over, a meter reading)
            var r = new Rehearsal(topics, mqtt, dispatch, meter, !mode.linkDown() && !mode.setupRefused(), triggers::inPlace);
            rehearsal = r;
            rounds = r.run(rehearseMs);
            rehearsal = null;
            readings = r.readings();
        }
        warming.join();
        if (pinCpuAtReady >= 0) CpuPin.pin(pinCpuAtReady);
        if (compilerYieldsAtReady) CompilerThreads.lower(19);
        synchronized (startLock) {
            warm = true;
            if (subscribed) mode.announce();
        }
        LOG.info("meter probed and broker subscribed in {} ms; decision path warm ({} invented triggers in {} ms; {} rehearsal rounds with {}"
                + " meter readings after): ready in {} ms", subscribedMs, warmed[0], warmed[1], rounds, readings, (System.nanoTime() - t0) / 1_000_000);
        long period = cfg.dashboardMs();
        ticker.scheduleAtFixedRate(FatalErrors.surfaced(this::publishDashboard), period, period, TimeUnit.MILLISECONDS);
        ticker.scheduleWithFixedDelay(FatalErrors.surfaced(() -> watch.tick(dispatch)), 200, 200, TimeUnit.MILLISECONDS);
        ticker.scheduleWithFixedDelay(FatalErrors.surfaced(() -> dispatch.onMeasuringThread(() -> {
            if (setup.reloadIfChanged()) {
                LOG.info("compensation file changed on disk: read again");
                monitor.compensation(setup.compensation(), setup.stepCompensations());
            }
        })), 1, 1, TimeUnit.SECONDS);
        LOG.info("line {} serving {} with recipe {}", cfg.line(), topics.base(), setup.recipe().name());
    }

    /** The status page and {@code /metrics}: off the trigger path (own threads, reading snapshots and copies only). */
    private void startStatus() throws Exception {
        var st = cfg.status();
        var registry = new io.prometheus.metrics.model.registry.PrometheusRegistry();
        registry.register(new LineMetrics(() -> lastSnapshot));
        io.prometheus.metrics.instrumentation.jvm.JvmMetrics.builder().register(registry);
        javax.net.ssl.SSLContext tls = st.tls() ? net.zbin.io.mqtt.TlsFiles.context(st.tlsCert(), st.tlsCert(), st.tlsKey()) : null;
        net.zbin.app.status.PageActions actions = st.operators() == null ? null : this::fromPage;
        status = net.zbin.app.status.StatusServer.start(boards,
                new net.zbin.app.status.StatusServer.Options(st.host(), st.port(), tls, st.operators(), actions, registry));
    }

    /** An operator's action from the page, run on the measuring thread like any command, waited for up to 5 s. */
    private String fromPage(String who, String action, String alarm, String note) throws net.zbin.app.status.PageActions.Refused {
        var f = new java.util.concurrent.CompletableFuture<String>();
        boolean queued = dispatch.onMeasuringThread(() -> {
            try {
                f.complete(commands.fromPage(who, action, alarm, note));
            } catch (net.zbin.io.mqtt.PayloadException | RuntimeException e) {
                f.completeExceptionally(e);
            }
        });
        if (!queued) throw new net.zbin.app.status.PageActions.Refused("the line is busy or stopping: try again");
        try {
            return f.get(5, TimeUnit.SECONDS);
        } catch (java.util.concurrent.ExecutionException e) {
            throw new net.zbin.app.status.PageActions.Refused(e.getCause().getMessage());
        } catch (java.util.concurrent.TimeoutException e) {
            throw new net.zbin.app.status.PageActions.Refused("the line did not answer within 5 s");
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            throw new net.zbin.app.status.PageActions.Refused("interrupted");
        }
    }

    /** The status page's address, or null when the line serves none. */
    public String statusUrl() { return status == null ? null : status.url(); }

    /**
     * Reads the record log back (today's and yesterday's files, nothing stamped in the future) into the figures, the
     * monitor and the book, then what the log cannot tell from the line's state file: a lot named by a command after
     * the last row, a reset of the counters, and the counters of answers that write no row.
     */
    private void recover() throws java.io.IOException {
        LineState saved = LineState.load(cfg.stateDir(), cfg.line());
        java.time.Instant now = clock.instant();
        java.time.Instant[] pendingReset = {saved == null ? null : saved.resetAt()};
        java.time.Instant[] lastRow = {null};
        long[] rows = {0};
        monitor.recovering(true);
        java.util.function.Consumer<net.zbin.core.DecisionEvent> apply = e -> {
            path.enterLot(e.decision().lot(), e.time());
            if (pendingReset[0] != null && !e.time().isBefore(pendingReset[0]) && e.decision().lot().equals(saved.lot())) {
                stats.resetAt(pendingReset[0]);
                pendingReset[0] = null;
            }
            path.recovered(e);
            lastRow[0] = e.time();
            rows[0]++;
        };
        java.nio.file.Path dir = cfg.records().dir();
        ReadBackCheckpoint ck = ReadBackCheckpoint.load(cfg.stateDir(), cfg.line(), fingerprint(), dir, cfg.deadlineMs(), monitor::scratch);
        String from = "the whole log of the last 24 h";
        if (ck != null) { // the figures as of the checkpoint, then only the rows after it
            long[] window = {0};
            RecordLogReader.readRange(dir, cfg.line(), ck.bookFrom(dir), ck.at(dir), now.plusSeconds(5), e -> { // streamed: up to 10 min of rows
                path.forBook(e);
                window[0]++;
            });
            path.checkpointLot(ck.bookLot());
            stats.restore(ck.stats());
            monitor.restore(ck.monitor());
            if (pendingReset[0] != null && ck.stats().resetAt() != null && pendingReset[0].equals(java.time.Instant.parse(ck.stats().resetAt())))
                pendingReset[0] = null; // the checkpoint's figures hold it
            lastRow[0] = java.time.Instant.parse(ck.lastRowAt());
            RecordLogReader.readRange(dir, cfg.line(), ck.at(dir), null, now.plusSeconds(5), apply);
            from = "the checkpoint as of " + ck.lastRowAt() + " (" + ck.file() + " at byte " + ck.offset() + "; " + window[0]
                    + " rows before it re-read for the repeat window) and the rows after it";
        } else {
            RecordLogReader.read(dir, cfg.line(), now.minus(Duration.ofDays(1)), now.plusSeconds(5), apply);
        }
        monitor.recovering(false);
        records.priorLastRow(lastRow[0]);
        int inBook = path.readBackDone();
        if (saved != null) {
            stats.restore(saved.repeats(), saved.rejected(), saved.reusedSeqs(), saved.busy());
            boolean lotAfterLastRow = saved.lotSince() != null && (lastRow[0] == null || !saved.lotSince().isBefore(lastRow[0]));
            if (lotAfterLastRow && !saved.lot().isEmpty()) path.enterLot(saved.lot(), saved.lotSince());
            if (pendingReset[0] != null && saved.lot().equals(stats.lot())) stats.resetAt(pendingReset[0]);
        }
        recovered = true;
        LOG.info("{} rows read back from the record log ({}); lot '{}', {} presentations in the repeat window", rows[0], from, stats.lot(), inBook);
    }

    /** What a read-back checkpoint's state depends on besides the rows: it is used only under the same. */
    private String fingerprint() {
        var r = setup.recipe();
        return cfg.line() + "|" + r.name() + "|" + cfg.monitorSettings(r) + "|deadline " + cfg.deadlineMs() + "|repeat " + cfg.repeatWindowMs();
    }

    /** A checkpoint's state, taken on the measuring thread between two decisions; null when the log cannot say where it stands. */
    private ReadBackCheckpoint.Taken takeCheckpoint() {
        return ReadBackCheckpoint.take(path, records, stats, monitor, cfg.repeatWindowMs(), fingerprint());
    }

    private final java.util.concurrent.atomic.AtomicReference<ReadBackCheckpoint.Taken> taken = new java.util.concurrent.atomic.AtomicReference<>();

    /** The ticker: writes the state the measuring thread took at the last period, and asks it for the next. */
    private void checkpoint() {
        writeCheckpoint(taken.getAndSet(null));
        dispatch.onMeasuringThread(() -> taken.set(takeCheckpoint()));
    }

    /** Where the last checkpoint written stands in the log: an idle line's is not written again and again. The ticker and a
     * stop write under this object's lock, one at a time (they share the temp file). */
    private net.zbin.io.RecordLog.Position lastCheckpointAt;

    private synchronized void writeCheckpoint(ReadBackCheckpoint.Taken t) {
        if (t == null || t.cut().end().equals(lastCheckpointAt)) return; // no row since: the same figures (commands are in the state file)
        try {
            ReadBackCheckpoint.write(cfg.stateDir(), cfg.line(), t);
            lastCheckpointAt = t.cut().end();
        } catch (java.io.IOException | RuntimeException e) {
            LOG.warn("read-back checkpoint not written: {}", e.toString());
        }
    }

    /** The line's state file: written by the ticker, after lot and reset commands, and at a clean stop. */
    void saveState() {
        if (!recovered) return;
        LineStats.Snapshot s = stats.snapshot();
        try {
            new LineState(s.lot(), s.lotSince(), stats.resetAt(), s.repeats(), s.rejected(), s.reusedSeqs(), s.busy(), clock.instant())
                    .save(cfg.stateDir(), cfg.line());
        } catch (java.io.IOException e) {
            LOG.warn("line state not saved: {}", e.toString());
        }
    }

    /**
     * One line, one daemon: the lock lives in the line's state folder (not among the record files, which tools
     * list and read as they are).
     */
    private void lock() throws Exception {
        locks.add(net.zbin.io.LineLock.acquire(cfg.stateDir(), cfg.line()));
    }

    /**
     * Paho's thread: a trigger on an idle line is measured here, anything else handed over ({@link Dispatch}). A payload beyond the size any trigger or command may have is
     * refused in its turn without being kept, so a waiting queue never holds more than that size per message.
     */
    private void route(String topic, byte[] payload, net.zbin.io.mqtt.Ack ack) {
        var r = rehearsal;
        if (r != null && r.heard(topic, payload, ack)) return;
        boolean trigger = topic.equals(topics.trigger());
        if (!trigger && !topic.equals(topics.command())) return;
        if (payload.length > TriggerCodec.MAX_BYTES) dispatch.submit(oversize(topic, payload.length), new byte[0], ack);
        else dispatch.submit(trigger ? triggers : commandsIn, payload, ack);
    }

    private Dispatch.Handler oversize(String topic, int bytes) {
        Runnable refuse = () -> path.reject(topic, "payload is " + bytes + " bytes, limit " + TriggerCodec.MAX_BYTES);
        return new Dispatch.Handler() {
            public void handle(byte[] p, long at, net.zbin.io.mqtt.Ack ack) { refuse.run(); }

            public Runnable overflow(byte[] p, long at) { return refuse; }
        };
    }

    private final Dispatch.Handler triggers = new Dispatch.Handler() {
        public void handle(byte[] p, long at, net.zbin.io.mqtt.Ack ack) { path.onTrigger(p, at, ack); }

        public Runnable overflow(byte[] p, long at) { return path.busy(p, at); }

        public boolean inPlace() { return triggersInPlace && !mode.linkDown() && !mode.setupRefused(); }
    };

    private final Dispatch.Handler commandsIn = new Dispatch.Handler() {
        public void handle(byte[] p, long at, net.zbin.io.mqtt.Ack ack) { commands.handle(p); }

        public Runnable overflow(byte[] p, long at) { return () -> path.reject(topics.command(), "line busy: send the command again"); }
    };

    private void publishDashboard() {
        saveState();
        checkpoint();
        try {
            monitor.tick();
            LineSnapshot snap = snapshot(mode.mode());
            var node = DashboardJson.encode(snap);
            lastSnapshot = snap;
            dashboards.incrementAndGet();
            if (boards != null) boards.heard(cfg.line(), net.zbin.app.status.Boards.Kind.DASHBOARD, node);
            mqtt.publish(topics.dashboard(), Payloads.bytes(node), 0, true);
        } catch (RuntimeException e) {
            LOG.warn("dashboard: {}", e.toString());
        }
    }

    private byte[] dashboard(Mode m) {
        var node = DashboardJson.encode(snapshot(m));
        if (boards != null) boards.heard(cfg.line(), net.zbin.app.status.Boards.Kind.DASHBOARD, node);
        return Payloads.bytes(node);
    }

    /** The line now, in one immutable snapshot (only copies are taken: the measuring thread never waits on it). */
    private LineSnapshot snapshot(Mode m) { return snapshot(clock.instant(), m, stats.snapshot(), monitor.snapshot()); }

    private LineSnapshot snapshot(java.time.Instant at, Mode m, LineStats.Snapshot figures, net.zbin.core.LineMonitor.Snapshot monitorFigures) {
        return new LineSnapshot(at, cfg.line(), setup.recipe().name(), m, figures, monitorFigures,
                mode.activeAlarms(), records.backlog(), records.dropped(), mqtt == null ? 0 : mqtt.buffered(),
                mode.linkDown() ? "down" : mode.setupRefused() ? "setup-refused" : "up", cfg.deadlineMs());
    }


    public long recordsWritten() { return records.written(); }

    /** Record rows kept in memory because the log could not be written. */
    public long recordBacklog() { return records.backlog(); }

    /** Bytes of those rows. */
    public long recordBacklogBytes() { return records.backlogBytes(); }

    /** Record rows dropped beyond the memory bound while the log could not be written. */
    public long recordsDropped() { return records.dropped(); }

    /** The monitor's figures now, as the dashboard shows them. */
    public net.zbin.core.LineMonitor.Snapshot monitorFigures() { return monitor.snapshot(); }

    /** The current lot's figures, as the dashboard shows them. */
    public net.zbin.core.BinTally.Snapshot lotFigures() { return stats.snapshot().lotTally(); }

    /** Clean stop: finish queued work, publish the final dashboard and offline, force the record log. */
    @Override
    public void close() {
        dispatch.close();
        ticker.shutdownNow();
        mode.drain(3000);
        if (mqtt != null) {
            mqtt.publishAndWait(topics.dashboard(), dashboard(Mode.OFFLINE), 1, true, 3000);
            mqtt.publishAndWait(topics.state(), mode.offline(), 1, true, 3000);
            mqtt.close();
        }
        if (status != null) status.close();
        records.close();
        saveState();
        if (recovered && path != null) writeCheckpoint(takeCheckpoint()); // the measuring thread has stopped: taken here
        meter.close();
        locks.forEach(net.zbin.io.LineLock::close);
        LOG.info("line {} stopped", cfg.line());
    }
}
