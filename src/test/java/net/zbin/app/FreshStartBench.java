package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;

import com.fasterxml.jackson.databind.node.ArrayNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.util.Arrays;
import java.util.Locale;
import java.util.Map;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.TimeUnit;
import net.zbin.io.Json;
import net.zbin.sim.Contacts;
import net.zbin.sim.PartModel;
import net.zbin.sim.SimMeter;
import net.zbin.sim.SimTcpServer;
import org.HdrHistogram.Histogram;
import org.eclipse.paho.client.mqttv3.MqttAsyncClient;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The real {@code zbin run} started as its own process, {@value #STARTS} times: from the process's start to its first
 * {@code ready}, then its first 100 decisions at a handler's pace against the floor ({@link BenchFloor}) measured in a
 * block after each start, and, as the reference a warm line sets on the same machine, {@value #WARM} more decisions after
 * {@link #SETTLE} (400) unmeasured ones. A JVM that already ran the daemon's code (as the other benches' does) would hide a
 * cold path; a fresh process cannot. The daemon starts as the systemd unit starts it: with the unit's {@code java} options (its heap
 * bound; {@code zbin run} itself sets its compiler threads to nice 19 at ready), {@code -jar} and a class-data archive that the first start after an update
 * writes when it stops (here: one unmeasured start that decides 100 parts).
 * {@code -Dzbin.bench.daemon.start=jar} starts it from the jar without an archive, {@code =classes} from the build's class
 * folders and jars. Then a restart late in a busy shift: one more daemon decides {@code zbin.bench.readback.rows} (90 000)
 * parts (2 000/s, then 1 000/s until its compiler threads have used no CPU in a second), and three starts are timed to
 * ready with those rows in today's record log (the start reads them back). That daemon's last {@value #CPU_PARTS}
 * decisions, at 1 000/s and warm, give its process's CPU time per decision (every thread's: the compiler's and the
 * collector's too, as the unit runs it) beside Mosquitto's, and split by thread name. The line is configured as a line
 * with a CPU of its own would be: {@code pin_cpu} the CPU serving the fewest devices' interrupts
 * ({@link TestLine#quietCpu}; {@code -Dzbin.bench.pin_cpu=off} leaves the key out, {@code =N} names one).
 * Run with {@code mvn -B -Pbench test -Dtest=FreshStartBench -Dsurefire.failIfNoSpecifiedTests=false} (the bench profile
 * builds the jar before the benches); results in {@code target/bench/fresh-start.json}.
 */
class FreshStartBench {
    static final int STARTS = 8, FIRST = 100, WARM = 100;
    /** The bench line's {@code pin_cpu}, null for none: {@code zbin.bench.pin_cpu} (off, quiet or a number), default the quietest CPU here. */
    static final Integer PIN_CPU = pinCpu(System.getProperty("zbin.bench.pin_cpu", "quiet"));

    static Integer pinCpu(String how) {
        return switch (how) {
            case "off" -> null;
            case "quiet" -> TestLine.quietCpu();
            default -> Integer.parseInt(how);
        };
    }

    /** Unmeasured decisions between the first 100 and the warm reference ({@code zbin.bench.fresh.settle}). */
    static final int SETTLE = Integer.getInteger("zbin.bench.fresh.settle", 400);

    /** How many of {@code blocks} have every value within {@code ms}. */
    static int whollyWithin(java.util.List<Histogram> blocks, double ms) {
        int n = 0;
        for (Histogram b : blocks) if (LineBench.count(b, ms) == b.getTotalCount()) n++;
        return n;
    }

    /**
     * A start's questions asked of a relayed floor ({@code own}, and {@code ownBlocks} block by block): how many of the first
     * 100s' decisions and of the warm reference lie within its p99 (of its own exchanges 99 % do, by definition), how many
     * starts' blocks wholly, and how often its own blocks do. Written under {@code key}; returns the line to print.
     */
    static String againstRelayed(ObjectNode out, String key, String name, Histogram own, java.util.List<Histogram> ownBlocks, Histogram first,
                                 Histogram warm, java.util.List<Histogram> firstOfEachStart, java.util.List<Histogram> warmOfEachStart) {
        double p50 = own.getValueAtPercentile(50) / 1e6, p99 = own.getValueAtPercentile(99) / 1e6;
        ObjectNode o = out.putObject(key);
        o.set("latency", LineBench.json(own));
        o.put("first_100_within_its_p99", LineBench.count(first, p99));
        o.put("warm_reference_within_its_p99", LineBench.count(warm, p99));
        o.put("starts_first_100_wholly_within", whollyWithin(firstOfEachStart, p99));
        o.put("warm_reference_blocks_wholly_within", whollyWithin(warmOfEachStart, p99));
        o.put("own_blocks_wholly_within", whollyWithin(ownBlocks, p99));
        o.put("own_blocks_of", ownBlocks.size());
        o.put("own", own.getTotalCount()); // 99 % of them lie within its p99 by definition: a controller no slower than it scores that
        return String.format(Locale.ROOT, "  against %s (%.3f ms; p50 %.3f): the first 100s' decisions %d of %d, the warm reference %d of %d;"
                + " every one of 100: the first 100 of %d of %d starts, the warm reference of %d of %d, that floor's own blocks %d of %d",
                name, p99, p50, LineBench.count(first, p99), first.getTotalCount(), LineBench.count(warm, p99), warm.getTotalCount(),
                whollyWithin(firstOfEachStart, p99), firstOfEachStart.size(), whollyWithin(warmOfEachStart, p99), warmOfEachStart.size(),
                whollyWithin(ownBlocks, p99), ownBlocks.size());
    }

    /** How the daemon's process starts: {@code unit} (the default), {@code jar} or {@code classes}; see the class comment. */
    static final String HOW = System.getProperty("zbin.bench.daemon.start", "unit");

    @TempDir
    Path dir;

    /** The daemon's process as {@link #HOW} says ({@link UnitProcess#start}). */
    Process start(Path cfg, String name, Path archive) throws Exception {
        return UnitProcess.start(dir, cfg, name, HOW, archive);
    }

    /** Decisions at 1 000/s whose process CPU time is counted, after the busy daemon's warm ones. */
    static final int CPU_PARTS = 10_000;

    /** {@code n} triggers of the busy daemon from {@code from} on, at {@code rate} per second (QoS 1, not waiting for answers). */
    static void sendAtRate(Tap tap, int from, int n, int rate) throws Exception {
        long period = 1_000_000_000L / rate, next = System.nanoTime();
        for (int i = from; i < from + n; i++) {
            tap.publishWaiting("zbin/fresh/trigger", "{\"seq\": " + (5_000_000L + i) + ", \"part\": \"B" + i + "\"}");
            next += period;
            long wait = next - System.nanoTime();
            if (wait > 0) TimeUnit.NANOSECONDS.sleep(wait);
        }
    }

    /** CPU time of the JIT compiler threads of process {@code pid}, ns. */
    static long compilerCpuNs(long pid) throws java.io.IOException {
        return LineBench.threadCpuNsByName(pid).entrySet().stream().filter(e -> e.getKey().contains("CompilerThre")).mapToLong(Map.Entry::getValue).sum();
    }

    /** Waits (120 s at most) until the line's record files hold {@code rows} rows: the parts sent are decided and logged. */
    static void awaitRows(RowCount count, long rows) throws Exception {
        long end = System.nanoTime() + TimeUnit.SECONDS.toNanos(120);
        while (count.rows() < rows && System.nanoTime() < end) Thread.sleep(100);
        if (count.rows() < rows) throw new AssertionError("the busy daemon logged " + count.rows() + " rows of " + rows + " within 120 s");
    }

    /** Waits for the line's {@code ready} state among what the tap heard after its first {@code mark} messages. */
    static void awaitReady(Tap tap, int mark) throws Exception {
        tap.awaitFrom(mark, m -> m.json() != null && m.json().path("mode").asText().equals("ready"), 1, 60_000);
    }

    /** SIGTERM (a clean stop), forcibly when it takes more than 20 s. */
    static void stop(Process daemon) throws InterruptedException {
        UnitProcess.stop(daemon);
    }

    /**
     * Rows in the line's record files (lines other than each file's header), counted as the files grow: each call reads
     * only the bytes written since the one before. Read whole every 100 ms, the day's files (tens of MB at the end of the
     * busy phase) would take the CPU the daemon's last decisions of a counted phase need.
     */
    static final class RowCount {
        private final Path records;
        /** Per file: bytes read so far, and the line ends among them. */
        private final Map<Path, long[]> read = new java.util.HashMap<>();
        private final java.nio.ByteBuffer buf = java.nio.ByteBuffer.allocate(1 << 16);

        RowCount(Path dir) { records = dir.resolve("records-fresh"); }

        long rows() throws java.io.IOException {
            if (!Files.isDirectory(records)) return 0;
            long n = 0;
            try (var files = Files.list(records)) {
                for (Path f : files.filter(x -> x.getFileName().toString().endsWith(".csv")).toList()) {
                    long[] at = read.computeIfAbsent(f, x -> new long[2]);
                    try (var ch = java.nio.channels.FileChannel.open(f)) {
                        ch.position(at[0]);
                        int got;
                        while ((got = ch.read(buf.clear())) > 0) {
                            for (int i = 0; i < got; i++) if (buf.get(i) == '\n') at[1]++;
                            at[0] += got;
                        }
                    }
                    n += Math.max(0, at[1] - 1);
                }
            }
            return n;
        }
    }

    @Test
    void aFreshProcess_readyAndItsFirst100_againstTheFloor() throws Exception {
        SimMeter meter = new SimMeter(new Contacts(), net.zbin.sim.Fixture.IDEAL, Clock.systemUTC(), 9, 0, SimMeter.RandomFaults.NONE);
        meter.contacts().load(new PartModel.Capacitor(100e-9, 0.02, 0, 0.01), 0);
        Histogram first = new Histogram(60_000_000_000L, 3), veryFirst = new Histogram(60_000_000_000L, 3);
        Histogram inside = new Histogram(60_000_000_000L, 3);
        // where in the first 100 the slow ones are: warm-up shows in the first ten, the machine's noise everywhere
        Histogram second10 = new Histogram(60_000_000_000L, 3), rest = new Histogram(60_000_000_000L, 3);
        // the reference: the same processes a little later, warm (after SETTLE more decisions), against the same floor
        Histogram warm = new Histogram(60_000_000_000L, 3), insideWarm = new Histogram(60_000_000_000L, 3);
        // the same, start by start: a target asks that every one of a start's first 100 be within the floor's p99
        java.util.List<Histogram> firstOfEachStart = new java.util.ArrayList<>(), warmOfEachStart = new java.util.ArrayList<>();
        Path archive = dir.resolve("zbin-fresh.jsa");
        long[] readyMs = new long[STARTS];
        try (MosquittoProcess broker = new MosquittoProcess(dir, "max_queued_messages 100000\n");
             SimTcpServer sim = new SimTcpServer(meter, 0);
             BenchFloor floor = new BenchFloor(broker.url(), BenchFloor.Relays.IN_JVM_AND_PROCESS);
             Tap tap = new Tap(broker.url(), "zbin/fresh/state")) {
            floor.meterAt(sim.port());
            Path cfg = TestLine.write(dir, "fresh", broker.url(), sim.port(), "handler: {deadline_ms: 150}\n"
                    + (PIN_CPU == null ? "" : "pin_cpu: " + PIN_CPU + "\n"), LineBench.flushMs());
            Map<String, CompletableFuture<Long>> waiting = new ConcurrentHashMap<>();
            java.util.List<String> firstFive = new java.util.concurrent.CopyOnWriteArrayList<>();
            // which of the first 100 took zbin itself over 1 ms (seq: ms; seq = start * 100 000 + position)
            java.util.List<String> slowInside = new java.util.concurrent.CopyOnWriteArrayList<>();
            MqttAsyncClient handler = LineBench.client(broker.url(), waiting, p -> {
                if (p.contains("\"part\":\"W")) return insideWarm;
                if (!p.contains("\"part\":\"S")) return null;
                int l = p.indexOf("\"latency_ms\":"), q = p.indexOf("\"seq\":");
                if (l >= 0 && q >= 0) {
                    long seq = Long.parseLong(p.substring(q + 6, p.indexOf(',', q)).trim());
                    String ms = p.substring(l + 13, p.indexOf(',', l)).trim();
                    if (seq % 1000 < 5) firstFive.add(seq + ": " + ms);
                    if (Double.parseDouble(ms) > 1.0) slowInside.add(seq + ": " + ms);
                }
                return inside;
            }, "zbin/fresh/decision");
            java.util.List<String> logs = new java.util.ArrayList<>();
            if (HOW.equals("unit")) {
                // the first start after an update: it has no archive yet and writes one when it stops
                int mark = tap.msgs.size();
                Process writer = start(cfg, "archive", archive);
                logs.add("archive");
                try {
                    awaitReady(tap, mark);
                    LineBench.paced(handler, waiting, "zbin/fresh/trigger", ", \"part\": \"A\"", FIRST, LineBench.PACE, 9_000_000L);
                } finally {
                    stop(writer);
                }
                if (!Files.exists(archive)) throw new AssertionError("the first start wrote no class-data archive " + archive + " when it stopped");
            }
            for (int i = 0; i < STARTS; i++) {
                floor.block(FIRST);
                int mark = tap.msgs.size();
                long t0 = System.nanoTime();
                Process daemon = start(cfg, Integer.toString(i), archive);
                logs.add(Integer.toString(i));
                try {
                    awaitReady(tap, mark);
                    readyMs[i] = (System.nanoTime() - t0) / 1_000_000;
                    String part = ", \"part\": \"S" + i + "\"";
                    Histogram one = LineBench.paced(handler, waiting, "zbin/fresh/trigger", part, 1, LineBench.PACE, i * 100_000L);
                    veryFirst.add(one);
                    Histogram early = LineBench.paced(handler, waiting, "zbin/fresh/trigger", part, 9, LineBench.PACE, i * 100_000L + 1);
                    Histogram late = LineBench.paced(handler, waiting, "zbin/fresh/trigger", part, FIRST - 10, LineBench.PACE, i * 100_000L + 10);
                    Histogram thisStart = new Histogram(60_000_000_000L, 3);
                    thisStart.add(one);
                    thisStart.add(early);
                    thisStart.add(late);
                    first.add(thisStart);
                    firstOfEachStart.add(thisStart);
                    second10.add(early);
                    rest.add(late);
                    LineBench.paced(handler, waiting, "zbin/fresh/trigger", ", \"part\": \"U" + i + "\"", SETTLE, LineBench.PACE, i * 100_000L + FIRST);
                    Histogram warmOfThisStart = LineBench.paced(handler, waiting, "zbin/fresh/trigger", ", \"part\": \"W" + i + "\"", WARM, LineBench.PACE,
                            i * 100_000L + FIRST + SETTLE);
                    warm.add(warmOfThisStart);
                    warmOfEachStart.add(warmOfThisStart);
                } finally {
                    stop(daemon);
                }
            }
            // A restart late in a busy shift: the start reads the day's record log back. The starts above found at most 800
            // rows; a line running for hours has tens of thousands. One more daemon decides that many, then three starts
            // are timed to ready with them in the log.
            int busyRows = Integer.getInteger("zbin.bench.readback.rows", 90_000);
            double cpuZbinUs, cpuBrokerUs, cpuSeconds;
            int quietAfterS;
            Map<String, Double> cpuByThread = new java.util.TreeMap<>();
            RowCount rowCount = new RowCount(dir);
            long rowsBefore = rowCount.rows();
            Process filler = start(cfg, "busy", archive);
            logs.add("busy");
            try {
                int mark = tap.msgs.size();
                awaitReady(tap, mark);
                // Most of them at 2 000/s; the last CPU_PARTS at 1 000/s, warm, counted: the process's CPU time (all its
                // threads, the compiler's and the collector's too) and Mosquitto's over them, per decision, as the unit runs it.
                // Warm takes long: after 20 000 parts the compiler still took 26-51 us a decision of the counted ones (its
                // threads run at nice 19 from ready), after 80 000 none.
                int warmRows = busyRows - CPU_PARTS;
                if (warmRows < CPU_PARTS) throw new IllegalArgumentException("zbin.bench.readback.rows: " + busyRows + " is under " + 2 * CPU_PARTS);
                sendAtRate(tap, 0, warmRows, 2000);
                awaitRows(rowCount, rowsBefore + warmRows);
                // Warm means the compiler has done its work: at the counted pace, a second at a time, until the process's
                // compiler threads used no CPU tick (10 ms) in a second (30 s at most); those parts are logged too.
                int quietFrom = warmRows;
                for (int s = 0; s < 30; s++) {
                    long jit0 = compilerCpuNs(filler.pid());
                    sendAtRate(tap, quietFrom, 1000, 1000);
                    quietFrom += 1000;
                    if (compilerCpuNs(filler.pid()) == jit0) break;
                }
                quietAfterS = (quietFrom - warmRows) / 1000;
                warmRows = quietFrom;
                awaitRows(rowCount, rowsBefore + warmRows);
                Map<String, Long> byName0 = LineBench.threadCpuNsByName(filler.pid());
                long zbin0 = LineBench.processCpuNs(filler.pid()), broker0 = LineBench.processCpuNs(broker.pid()), t0 = System.nanoTime();
                sendAtRate(tap, warmRows, CPU_PARTS, 1000);
                awaitRows(rowCount, rowsBefore + warmRows + CPU_PARTS);
                cpuZbinUs = (LineBench.processCpuNs(filler.pid()) - zbin0) / 1e3 / CPU_PARTS;
                cpuBrokerUs = (LineBench.processCpuNs(broker.pid()) - broker0) / 1e3 / CPU_PARTS;
                cpuSeconds = (System.nanoTime() - t0) / 1e9;
                LineBench.threadCpuNsByName(filler.pid()).forEach((k, v) -> {
                    double us = (v - byName0.getOrDefault(k, 0L)) / 1e3 / CPU_PARTS;
                    if (us >= 1) cpuByThread.put(k, us);
                });
            } finally {
                stop(filler);
            }
            long readBackRows = rowCount.rows();
            long[] readyWithRows = new long[3];
            for (int i = 0; i < readyWithRows.length; i++) {
                int mark = tap.msgs.size();
                long t0 = System.nanoTime();
                Process daemon = start(cfg, "rows-" + i, archive);
                logs.add("rows-" + i);
                try {
                    awaitReady(tap, mark);
                    readyWithRows[i] = (System.nanoTime() - t0) / 1_000_000;
                } finally {
                    stop(daemon);
                }
            }
            handler.disconnect().waitForCompletion(5000);
            handler.close();
            double floorP50 = floor.ms(50), floorP99 = floor.ms(99);
            long[] sorted = readyMs.clone();
            Arrays.sort(sorted);
            ObjectNode out = Json.object();
            out.put("machine", Runtime.getRuntime().availableProcessors() + " cores, " + System.getProperty("java.vm.name") + " " + System.getProperty("java.version"));
            out.put("starts", STARTS);
            ArrayNode r = out.putArray("ready_after_start_ms");
            for (long v : readyMs) r.add(v);
            out.put("ready_median_ms", sorted[STARTS / 2]);
            out.put("ready_max_ms", sorted[STARTS - 1]);
            out.put("read_back_rows", readBackRows);
            ArrayNode rb = out.putArray("ready_with_those_rows_in_the_record_log_ms");
            for (long v : readyWithRows) rb.add(v);
            out.set("echo", LineBench.json(floor.echo));
            out.set("meter", LineBench.json(floor.meter));
            out.put("floor_p50_ms", floorP50);
            out.put("floor_p99_ms", floorP99);
            ObjectNode f = LineBench.json(first);
            f.put("decisions", first.getTotalCount());
            f.put("within_floor_p99", LineBench.count(first, floorP99));
            out.set("first_100_after_each_start", f);
            out.set("first_100_inside_zbin_arrival_to_decided", LineBench.json(inside));
            ArrayNode ff = out.putArray("inside_zbin_first_five_after_each_start_seq_ms");
            firstFive.forEach(ff::add);
            ArrayNode si = out.putArray("inside_zbin_first_100_over_1ms_seq_ms");
            slowInside.forEach(si::add);
            // a count, not a timing: how many decisions took zbin's own code over 1 ms, after a start and warm
            long overFirst = inside.getTotalCount() - LineBench.count(inside, 1.0), overWarm = insideWarm.getTotalCount() - LineBench.count(insideWarm, 1.0);
            ObjectNode over = out.putObject("inside_zbin_over_1ms");
            over.put("first_100", overFirst);
            over.put("first_100_of", inside.getTotalCount());
            over.put("warm_reference", overWarm);
            over.put("warm_reference_of", insideWarm.getTotalCount());
            ObjectNode v = LineBench.json(veryFirst);
            v.put("within_floor_p99", LineBench.count(veryFirst, floorP99));
            out.set("first_decision_after_each_start", v);
            ObjectNode v2 = LineBench.json(second10);
            v2.put("within_floor_p99", LineBench.count(second10, floorP99));
            out.set("decisions_2_to_10_after_each_start", v2);
            ObjectNode v3 = LineBench.json(rest);
            v3.put("within_floor_p99", LineBench.count(rest, floorP99));
            out.set("decisions_11_to_100_after_each_start", v3);
            ObjectNode w = LineBench.json(warm);
            w.put("decisions", warm.getTotalCount());
            w.put("within_floor_p99", LineBench.count(warm, floorP99));
            out.set("reference_warm_" + WARM + "_after_" + SETTLE + "_more_each_start", w);
            out.set("reference_warm_inside_zbin_arrival_to_decided", LineBench.json(insideWarm));
            // every one of 100 within the floor's p99, asked of each start's first 100, of each start's warm reference and of
            // the floor's own blocks of 100 (the i-th echo plus the i-th meter exchange): how often the floor itself passes
            int startsAll = whollyWithin(firstOfEachStart, floorP99), warmAll = whollyWithin(warmOfEachStart, floorP99),
                    floorAll = whollyWithin(floor.blockExchanges, floorP99);
            long floorWithin = 0, floorExchanges = 0;
            for (Histogram b : floor.blockExchanges) {
                floorWithin += LineBench.count(b, floorP99);
                floorExchanges += b.getTotalCount();
            }
            ObjectNode all = out.putObject("every_one_of_100_within_floor_p99");
            all.put("starts_first_100", startsAll);
            all.put("starts", firstOfEachStart.size());
            all.put("warm_reference_blocks", warmAll);
            all.put("warm_reference_of", warmOfEachStart.size());
            all.put("floor_own_blocks", floorAll);
            all.put("floor_own_blocks_of", floor.blockExchanges.size());
            all.put("floor_own_exchanges_within", floorWithin);
            all.put("floor_own_exchanges", floorExchanges);
            // the same questions against the relayed floors: an echo whose responder makes the meter exchange before it answers
            String relayedLine = againstRelayed(out, "relayed_floor", "the relayed floor's p99", floor.relayed, floor.relayedBlocks, first, warm,
                    firstOfEachStart, warmOfEachStart);
            String relayedProcessLine = againstRelayed(out, "relayed_floor_own_process", "the relayed floor's p99 with its responder a process of its own",
                    floor.relayedProcess, floor.relayedProcessBlocks, first, warm, firstOfEachStart, warmOfEachStart);
            out.put("started_as", HOW);
            out.put("pin_cpu", PIN_CPU == null ? "none" : PIN_CPU.toString());
            ObjectNode cpu = out.putObject("process_cpu_per_decision_at_1000_per_s");
            cpu.put("decisions", CPU_PARTS);
            cpu.put("decisions_before", busyRows - CPU_PARTS + 1000 * quietAfterS);
            cpu.put("seconds_at_1000_per_s_before_a_second_without_compiling", quietAfterS);
            cpu.put("seconds", cpuSeconds);
            cpu.put("zbin_us", cpuZbinUs);
            cpu.put("broker_us", cpuBrokerUs);
            cpu.put("zbin_over_broker", cpuZbinUs / cpuBrokerUs);
            ObjectNode byThread = cpu.putObject("zbin_us_by_thread_name");
            cpuByThread.forEach(byThread::put);
            System.out.printf(Locale.ROOT, "  process CPU per decision at 1000/s, warm, %d decisions in %.1f s (the daemon's whole process, the unit's options): zbin %.0f us, Mosquitto %.0f us (%.2f x)%n",
                    CPU_PARTS, cpuSeconds, cpuZbinUs, cpuBrokerUs, cpuZbinUs / cpuBrokerUs);
            System.out.printf(Locale.ROOT, "    of it by thread (us per decision, 1 us or more): %s%n", cpuByThread);
            System.out.printf(Locale.ROOT, "%n  ready after process start, ms: %s (median %d, max %d)%n", Arrays.toString(readyMs), sorted[STARTS / 2], sorted[STARTS - 1]);
            System.out.printf(Locale.ROOT, "  ready after process start with %d rows of today in the record log, ms: %s%n", readBackRows,
                    Arrays.toString(readyWithRows));
            System.out.printf(Locale.ROOT, "  %-52s %9s %9s %9s %9s%n", "latency at " + LineBench.PACE + "/s, ms", "p50", "p99", "p99.9", "max");
            for (var e : new Object[][] {{"floor: MQTT echo", floor.echo}, {"floor: meter request/response", floor.meter},
                    {"relayed floor: echo with the meter exchange in it", floor.relayed},
                    {"  the same, its responder a process of its own", floor.relayedProcess},
                    {"first " + FIRST + " decisions after each of " + STARTS + " starts", first}, {"  of it inside zbin: arrival -> decided", inside},
                    {"  the very first decision after each start", veryFirst}, {"  decisions 2 to 10", second10}, {"  decisions 11 to 100", rest},
                    {"reference: " + WARM + " warm ones after " + SETTLE + " more, each start", warm}, {"  of it inside zbin", insideWarm}}) {
                Histogram h = (Histogram) e[1];
                System.out.printf(Locale.ROOT, "  %-52s %9.3f %9.3f %9.3f %9.3f%n", e[0], h.getValueAtPercentile(50) / 1e6,
                        h.getValueAtPercentile(99) / 1e6, h.getValueAtPercentile(99.9) / 1e6, h.getMaxValue() / 1e6);
            }
            System.out.printf(Locale.ROOT, "  floor (echo + meter): p50 %.3f ms, p99 %.3f ms; within the floor's p99: %d of the %d first 100s' decisions,"
                    + " %d of the %d very first, %d of %d second to tenth, %d of %d eleventh to hundredth; the warm reference %d of %d (started as: %s)%n", floorP50, floorP99,
                    LineBench.count(first, floorP99), first.getTotalCount(), LineBench.count(veryFirst, floorP99), veryFirst.getTotalCount(),
                    LineBench.count(second10, floorP99), second10.getTotalCount(), LineBench.count(rest, floorP99), rest.getTotalCount(),
                    LineBench.count(warm, floorP99), warm.getTotalCount(), HOW);
            System.out.printf(Locale.ROOT, "  every one of 100 within the floor's p99: the first 100 of %d of the %d starts; the warm reference of %d of %d;"
                    + " the floor's own blocks of 100 (the i-th echo plus the i-th meter exchange) %d of %d, %d of their %d exchanges within%n",
                    startsAll, firstOfEachStart.size(), warmAll, warmOfEachStart.size(), floorAll, floor.blockExchanges.size(), floorWithin, floorExchanges);
            System.out.println(relayedLine);
            System.out.println(relayedProcessLine);
            System.out.printf(Locale.ROOT, "  inside zbin over 1 ms (arrival -> decided): %d of the first 100s' %d, %d of the warm reference's %d%n",
                    overFirst, inside.getTotalCount(), overWarm, insideWarm.getTotalCount());
            assertEquals((long) STARTS * FIRST, first.getTotalCount(), "every trigger after each start answered");
            assertEquals((long) STARTS * WARM, warm.getTotalCount(), "every warm reference trigger answered");
            Path logDir = Path.of("target/bench/fresh-start-logs");
            if (Files.isDirectory(logDir)) { // this run's logs only
                try (var old = Files.list(logDir)) {
                    for (Path stale : old.toList()) Files.delete(stale);
                }
            }
            Files.createDirectories(logDir);
            for (String name : logs) Files.copy(dir.resolve("daemon-" + name + ".log"), logDir.resolve("daemon-" + name + ".log"),
                    java.nio.file.StandardCopyOption.REPLACE_EXISTING);
            Files.writeString(Path.of("target/bench/fresh-start.json"), Json.mapper().writerWithDefaultPrettyPrinter().writeValueAsString(out));
        }
    }
}
