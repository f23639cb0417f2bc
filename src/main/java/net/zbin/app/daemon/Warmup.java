package net.zbin.app.daemon;

import com.fasterxml.jackson.databind.node.ObjectNode;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.util.List;
import net.zbin.core.Reading;
import net.zbin.core.Recipe;
import net.zbin.core.TestConditions;
import net.zbin.io.Json;
import net.zbin.io.LineConfig;
import net.zbin.io.RecordLog;
import net.zbin.io.meter.MeterReading;
import net.zbin.io.meter.MeterSession;
import net.zbin.io.mqtt.Payloads;
import net.zbin.io.mqtt.Publisher;
import net.zbin.io.mqtt.Topics;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Runs invented triggers through the line's own {@link TriggerPath} before the line says it is ready — the trigger
 * decode, the decision book, the test plan and grading, the record row written to a file, the decision's encoding,
 * the figures, the line monitor, at every lot change the finished lot's snapshot and dashboard, and every 64 parts the
 * read-back checkpoint taken between two parts (written into its scratch folder) — so the first
 * real part of a shift, and the first of each new lot, runs compiled code rather than the interpreter. Everything
 * it touches is a scratch copy: its meter answers from memory, its record log lives in a temporary folder deleted
 * afterwards, its publisher sends nothing, and its figures, book and monitor are its own; only the recipe, the
 * compensation and the config are the line's, and they are only read.
 */
final class Warmup {
    private static final Logger LOG = LoggerFactory.getLogger(Warmup.class);
    /** Parts per invented lot: a lot change (and its dashboard) every this many. */
    static final int LOT_PARTS = 64;

    private Warmup() {}

    /**
     * Runs up to {@code rounds} triggers, but no longer than {@code maxMs} once a first lot and the next one's start
     * ran: on a loaded machine the line says ready in time rather than after a fixed amount of work. Returns how many
     * triggers it ran.
     */
    static long run(LineConfig cfg, LineSetup setup, int rounds, long maxMs) {
        long end = System.nanoTime() + maxMs * 1_000_000L;
        Path dir = null;
        try {
            dir = Files.createTempDirectory("zbin-warm-up-");
        } catch (IOException e) { // no temporary folder: a scratch folder in the line's own state folder, removed the same way
            try {
                dir = Files.createTempDirectory(Files.createDirectories(cfg.stateDir()), "zbin-warm-up-");
            } catch (IOException | RuntimeException again) {
                LOG.warn("warm-up skipped: no scratch folder ({})", again.toString());
                return 0;
            }
        }
        Clock clock = Clock.systemUTC();
        Topics topics = new Topics(cfg.mqtt().topicRoot(), cfg.line());
        Counting out = new Counting();
        LineMode mode = new LineMode(clock, topics, false, () -> setup.recipe().name()).quiet();
        LineStats stats = new LineStats(clock, cfg.deadlineMs());
        MonitorListener monitor = new MonitorListener(cfg, mode, clock, setup.recipe());
        monitor.compensation(setup.compensation(), setup.stepCompensations());
        DecisionBook book = new DecisionBook(cfg.repeatWindowMs(), 20_000);
        var rs = cfg.records();
        RecordLog records = new RecordLog(new LineConfig.RecordSettings(dir, rs.flushMs(),
                rs.rotateBytes(), false), cfg.line(), null);
        Canned meter = new Canned(setup.plan());
        TriggerPath path = new TriggerPath(cfg, topics, setup, meter, out, records, mode, stats, book, List.of(stats, monitor), clock);
        path.onLotEnd(ended -> {
            LineSnapshot s = new LineSnapshot(clock.instant(), cfg.line(), setup.recipe().name(), Mode.READY, stats.snapshot(ended),
                    monitor.snapshot(), mode.activeAlarms(), records.backlog(), records.dropped(), 0, "up", cfg.deadlineMs());
            out.publish(topics.dashboard(), Payloads.bytes(DashboardJson.encode(s)), 0, false);
        });
        int i = 0;
        try {
            // at least one lot and the start of the next, whatever the clock says; then up to the time bound
            for (; i < rounds && (i <= LOT_PARTS || i % 32 != 0 || System.nanoTime() < end); i++) {
                path.onTrigger(trigger(i), System.nanoTime());
                // the read-back checkpoint, taken between two parts as the line takes it, written into the scratch folder
                if (i % 64 == 63) checkpoint(path, records, stats, monitor, cfg, dir);
            }
        } finally {
            records.close();
            delete(dir);
        }
        return i;
    }

    private static void checkpoint(TriggerPath path, RecordLog records, LineStats stats, MonitorListener monitor, LineConfig cfg, Path dir) {
        var t = ReadBackCheckpoint.take(path, records, stats, monitor, cfg.repeatWindowMs(), "warm-up");
        if (t == null) return;
        try {
            ReadBackCheckpoint.write(dir, cfg.line(), t);
        } catch (IOException e) {
            LOG.debug("warm-up checkpoint not written: {}", e.toString());
        }
    }

    /**
     * The {@code i}-th invented trigger, shaped as handlers send them: with and without part, lot and kind, compact
     * and with white space, now and then a retest. The compiler optimises for what it saw; a shape the warm-up never
     * sent would throw that code away at the first real part and run it slowly again until it is compiled anew.
     */
    static byte[] trigger(int i) {
        // every 16th trigger comes again at once: the repeat answered from the book. What it says follows from its seq
        // alone, so a repeat is the same presentation (a handler reusing seqs would be logged as such in the line's log)
        int seq = i % 16 == 15 ? i - 1 : i;
        ObjectNode t = Json.object();
        t.put("seq", seq);
        if (seq % 7 != 3) t.put("part", "W" + seq);
        if (seq % 5 != 1) t.put("lot", "warm-up-" + (seq / LOT_PARTS) % 2); // absent: the current lot goes on
        if (seq % 3 == 0) t.put("kind", "part");
        if (seq % 29 == 28) t.put("retest_of", seq - 1);
        if (i % 2 == 0) return Payloads.bytes(t);
        try {
            return PRETTY.writeValueAsBytes(t);
        } catch (com.fasterxml.jackson.core.JsonProcessingException e) {
            throw new IllegalStateException("a tree always serialises", e);
        }
    }

    private static final com.fasterxml.jackson.databind.ObjectWriter PRETTY = Json.mapper().writerWithDefaultPrettyPrinter();

    private static void delete(Path dir) {
        try (var files = Files.walk(dir)) {
            files.sorted(java.util.Comparator.reverseOrder()).forEach(p -> p.toFile().delete());
        } catch (IOException | RuntimeException e) {
            LOG.debug("warm-up folder {} not removed: {}", dir, e.toString());
        }
    }

    /** Sends nothing; counts, so the work that built each message cannot be left out. */
    private static final class Counting implements Publisher {
        long messages, bytes;

        @Override
        public void publish(String topic, byte[] payload, int qos, boolean retained) {
            messages++;
            bytes += payload.length;
        }
    }

    /**
     * A meter that answers from memory: at each step's conditions, readings spread ±20 % around the step's ideal
     * impedance (pass, fail and the guard zone alike), so every branch of the grading runs.
     */
    private static final class Canned implements MeterSession {
        private final Recipe[] plan;
        private TestConditions now;
        private int n;

        Canned(Recipe[] plan) { this.plan = plan.clone(); }

        @Override
        public String identify() { return "warm-up"; }

        @Override
        public void apply(TestConditions c) { now = c; }

        @Override
        public MeterReading measure() {
            Recipe step = plan[0];
            for (Recipe r : plan) if (r.test().equals(now)) step = r;
            double dev = ((n++ * 7919) % 400 - 200) / 1000.0;
            double z = step.idealZOhm() * (1 + dev), f = step.freqHz();
            Reading rd = switch (step.partType()) {
                case CAPACITOR -> new Reading(f, z * 0.01, -z);
                case INDUCTOR -> new Reading(f, z * 0.01, z);
                case RESISTOR -> new Reading(f, z, z * 1e-4);
            };
            return new MeterReading(rd, 0);
        }

        @Override
        public long reconnects() { return 0; }

        @Override
        public long unaskedBytes() { return 0; }

        @Override
        public void close() { }
    }
}
