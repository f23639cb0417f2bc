package net.zbin.app.daemon;

import java.time.Clock;
import java.time.Duration;
import java.util.List;
import java.util.concurrent.ArrayBlockingQueue;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.RejectedExecutionException;
import java.util.concurrent.ScheduledExecutorService;
import java.util.concurrent.ThreadPoolExecutor;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicBoolean;
import net.zbin.io.ConfigException;
import net.zbin.io.LineConfig;
import net.zbin.io.RecordLog;
import net.zbin.io.RecordLogReader;
import net.zbin.io.meter.MeterException;
import net.zbin.io.meter.MeterSession;
import net.zbin.io.mqtt.MqttLink;
import net.zbin.io.mqtt.Payloads;
import net.zbin.io.mqtt.Topics;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The sorting daemon of one line: wiring only. Paho's thread hands triggers and commands to one
 * measuring thread through a bounded queue (a trigger beyond it is answered {@code line-busy} at once by
 * the overflow thread); the {@link TriggerPath} decides; listeners hear of each decision; a ticker
 * publishes the dashboard and heals the meter link.
 */
public final class Daemon implements AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(Daemon.class);
    /** Triggers and commands waiting for the measuring thread at most. */
    static final int QUEUE = 10_000;

    private final LineConfig cfg;
    private final MeterSession meter;
    private final Clock clock;
    private final Topics topics;
    private final LineSetup setup;
    private final LineMode mode;
    private final LineStats stats;
    private final RecordLog records;
    private final DecisionBook book;
    private final ThreadPoolExecutor work, overflow;
    private final ScheduledExecutorService ticker = Executors.newSingleThreadScheduledExecutor(r -> named(r, "ticker"));
    private final AtomicBoolean probing = new AtomicBoolean();
    private MqttLink mqtt;
    private TriggerPath path;
    private LineCommands commands;

    public Daemon(LineConfig cfg, MeterSession meter, Clock clock) throws ConfigException {
        this.cfg = cfg;
        this.meter = meter;
        this.clock = clock;
        this.topics = new Topics(cfg.mqtt().topicRoot(), cfg.line());
        this.setup = new LineSetup(cfg);
        this.mode = new LineMode(clock, topics, cfg.records().pauseOnFailure(), () -> setup.recipe().name());
        this.stats = new LineStats(clock, cfg.deadlineMs());
        this.book = new DecisionBook(cfg.repeatWindowMs(), 100_000);
        this.records = new RecordLog(cfg.records(), cfg.line(), new RecordLog.Listener() {
            public void failed(String message) { mode.setLogFailing(true, message); }

            public void recovered() { mode.setLogFailing(false, null); }
        });
        this.overflow = new ThreadPoolExecutor(1, 1, 0, TimeUnit.MILLISECONDS, new ArrayBlockingQueue<>(QUEUE * 5),
                r -> named(r, "overflow-" + cfg.line()), (r, ex) -> LOG.error("overflow queue full: a trigger got no answer"));
        this.work = new ThreadPoolExecutor(1, 1, 0, TimeUnit.MILLISECONDS, new ArrayBlockingQueue<>(QUEUE),
                r -> named(r, "line-" + cfg.line()), (r, ex) -> overflowed(r));
    }

    private static Thread named(Runnable r, String name) {
        Thread t = new Thread(r, name);
        t.setDaemon(true);
        return t;
    }

    public Topics topics() { return topics; }

    /** Recovers from the record log, warms up, connects and serves; waits up to {@code connectTimeoutMs} for the broker. */
    public void start(long connectTimeoutMs) throws Exception {
        mqtt = new MqttLink(cfg.mqtt(), topics.state(), mode.offline(), List.of(topics.trigger(), topics.command()), this::route);
        path = new TriggerPath(cfg, topics, setup, meter, mqtt, records, mode, stats, book, List.of(stats), clock);
        commands = new LineCommands(topics, mqtt, setup, mode, stats, path, meter, clock);
        long from = clock.millis() - cfg.repeatWindowMs();
        RecordLogReader.read(cfg.records().dir(), cfg.line(), clock.instant().minus(Duration.ofDays(1)), e -> path.recovered(e, from));
        records.start();
        long t0 = System.nanoTime();
        Warmup.run(setup.recipe(), setup.compensation(), 20_000);
        LOG.info("decision path warm in {} ms; {} presentations of lot '{}' recovered from the record log",
                (System.nanoTime() - t0) / 1_000_000, book.size(), book.lot());
        probeMeter();
        mode.attach(mqtt);
        mqtt.onConnect(mode::announce);
        mqtt.connect(connectTimeoutMs);
        long period = cfg.dashboardMs();
        ticker.scheduleAtFixedRate(this::publishDashboard, period, period, TimeUnit.MILLISECONDS);
        ticker.scheduleWithFixedDelay(this::healMeter, 200, 200, TimeUnit.MILLISECONDS);
        LOG.info("line {} serving {} with recipe {}", cfg.line(), topics.base(), setup.recipe().name());
    }

    /** Paho's thread: only hand the message over. */
    private void route(String topic, byte[] payload) {
        long arrived = System.nanoTime();
        try {
            if (topic.equals(topics.trigger())) work.execute(new Work(new Job(payload, arrived, true)));
            else if (topic.equals(topics.command())) work.execute(new Work(new Job(payload, arrived, false)));
        } catch (RejectedExecutionException e) {
            LOG.debug("stopping: {} dropped", topic);
        }
    }

    private record Job(byte[] payload, long arrived, boolean trigger) {}

    private class Work implements Runnable {
        private final Job job;

        Work(Job job) { this.job = job; }

        public void run() {
            if (job.trigger()) path.onTrigger(job.payload(), job.arrived());
            else commands.handle(job.payload());
        }
    }

    private void overflowed(Runnable r) {
        if (work.isShutdown()) return;
        Job j = ((Work) r).job;
        overflow.execute(() -> {
            if (j.trigger()) path.busy(j.payload(), j.arrived());
            else path.reject(topics.command(), "line busy: " + QUEUE + " messages are waiting; send the command again");
        });
    }

    /** While the meter link is down, tries it again in the background (the session keeps its own backoff). */
    private void healMeter() {
        if (!mode.linkDown() || !probing.compareAndSet(false, true)) return;
        try {
            work.execute(new Work(new Job(null, 0, false)) {
                @Override
                public void run() {
                    probeMeter();
                    probing.set(false);
                }
            });
        } catch (RejectedExecutionException e) {
            probing.set(false);
        }
    }

    private void probeMeter() {
        try {
            meter.apply(setup.recipe().test());
            LOG.info("meter: {}", meter.identify());
            mode.setLinkDown(false, null);
        } catch (MeterException e) {
            LOG.debug("meter not ready: {}", e.getMessage());
            mode.setLinkDown(true, e.getMessage());
        }
    }

    private void publishDashboard() {
        try {
            mqtt.publish(topics.dashboard(), dashboard(mode.mode()), 0, true);
        } catch (RuntimeException e) {
            LOG.warn("dashboard: {}", e.toString());
        }
    }

    private byte[] dashboard(Mode m) {
        return Payloads.bytes(DashboardJson.encode(cfg.line(), setup.recipe().name(), m, stats.snapshot(), mode.activeAlarms().keySet(),
                records.backlog(), records.dropped(), mqtt.buffered()));
    }

    public long recordsWritten() { return records.written(); }

    /** The current lot's figures, as the dashboard shows them. */
    public net.zbin.core.BinTally.Snapshot lotFigures() { return stats.snapshot().lotTally(); }

    /** Clean stop: finish queued work, publish the final dashboard and offline, force the record log. */
    @Override
    public void close() {
        work.shutdown();
        overflow.shutdown();
        try {
            if (!work.awaitTermination(10, TimeUnit.SECONDS)) work.shutdownNow();
            overflow.awaitTermination(5, TimeUnit.SECONDS);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
        ticker.shutdownNow();
        mode.drain(3000);
        if (mqtt != null) {
            mqtt.publishAndWait(topics.dashboard(), dashboard(Mode.OFFLINE), 1, true, 3000);
            mqtt.publishAndWait(topics.state(), mode.offline(), 1, true, 3000);
            mqtt.close();
        }
        records.close();
        meter.close();
        LOG.info("line {} stopped", cfg.line());
    }
}
