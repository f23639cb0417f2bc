package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;

import com.fasterxml.jackson.databind.node.ObjectNode;
import java.io.BufferedReader;
import java.io.OutputStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Arrays;
import java.util.Locale;
import java.util.Map;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicLong;
import net.zbin.io.Json;
import net.zbin.io.mqtt.NoDelaySockets;
import net.zbin.sim.Contacts;
import net.zbin.sim.PartModel;
import net.zbin.sim.Scenario;
import org.HdrHistogram.Histogram;
import org.eclipse.paho.client.mqttv3.IMqttDeliveryToken;
import org.eclipse.paho.client.mqttv3.MqttAsyncClient;
import org.eclipse.paho.client.mqttv3.MqttCallback;
import org.eclipse.paho.client.mqttv3.MqttConnectOptions;
import org.eclipse.paho.client.mqttv3.MqttException;
import org.eclipse.paho.client.mqttv3.MqttMessage;
import org.eclipse.paho.client.mqttv3.persist.MemoryPersistence;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The line end to end through a Mosquitto it starts itself, side by side with its floor in the same run:
 * trigger → decision latency at a handler's pace against a bare MQTT echo through the same broker plus
 * one request/response with the meter simulator at zero measurement time; the first decision of each of 45 lots
 * (5 of 1 000 parts, 40 of 100) against the floor's p99, also apart: those that come after a pause (a floor block) and
 * those in a running line, beside the first decision after a pause in the same lot (the first decisions after a start:
 * {@link FreshStartBench});
 * and open-loop rates (3 000/s for 60 s, the others for 10 s: {@code -Dzbin.bench.long.seconds}, {@code -Dzbin.bench.seconds}) with
 * lost and duplicated decisions counted and the cores each part of the rig used. The line and its floor
 * ({@link BenchFloor}) are measured in alternating blocks of the same run, so a shared machine's changing load weighs
 * on both. The daemon runs in the bench's JVM; {@code -Dzbin.bench.line.daemon=process} runs it as {@code zbin run} in a
 * process of its own ({@link LineUnderBench}). Run with {@code mvn -B -Pbench test}; results in {@code target/bench/line.json}.
 */
class LineBench {
    static final int PACE = 200, SAMPLES = 3000, LOTS = 5, ROUNDS = 6, SHORT_LOTS = 40, SHORT_LOT = 100, LONG_RATE = 3000;
    /**
     * Decisions (and floor exchanges) before the first measured block: the compiler's top tier takes a method after thousands
     * of calls ({@code zbin.bench.line.warm.parts}, for an A/B).
     */
    static final int WARM_PARTS = Integer.getInteger("zbin.bench.line.warm.parts", 15_000);
    /** Parts per lot while warming ({@code zbin.bench.line.warm.lot}; 15 000 warms in one lot, for an A/B). */
    static final int WARM_LOT = Integer.getInteger("zbin.bench.line.warm.lot", 1_000);

    @TempDir
    Path dir;

    /**
     * The record log's {@code flush_ms} for the benches' lines: the shipped default (null: the key left out), as a line
     * runs; {@code -Dzbin.bench.flush_ms=50} forces the file as often as the tests' lines do, for an A/B.
     */
    static Integer flushMs() { return Integer.getInteger("zbin.bench.flush_ms"); }

    /** Inside zbin, per decision of the paced run: its own latency_ms, from the trigger's arrival to the decision made (ns). */
    static final Histogram INSIDE = new Histogram(60_000_000_000L, 3);
    /** The same figure for the first decision of each new lot. */
    static final Histogram INSIDE_LOT = new Histogram(60_000_000_000L, 3);
    /**
     * The same figure for the first decision after a pause (seconds without a part: a floor block), whatever its lot: the
     * seqs sent so are put in {@link #AFTER_PAUSE_SEQS} before they go out. It tells a pause's cost inside zbin's code
     * (cold caches on its own path) from the cost outside it (the MQTT hops and the meter's, which the floor pays too).
     */
    static final Histogram INSIDE_AFTER_PAUSE = new Histogram(60_000_000_000L, 3);
    static final java.util.Set<String> AFTER_PAUSE_SEQS = ConcurrentHashMap.newKeySet();
    /** The line's own latency_ms of each decision of the paced line blocks, by seq (ns). */
    static final Map<Long, Long> INSIDE_BY_SEQ = new ConcurrentHashMap<>();
    /** Parts within which two slow decisions count as one stretch: 10, 50 ms at the pace. */
    static final int NEAR = 10;

    /**
     * The decisions of the paced line blocks slower than {@code floorP99}, told apart: how much of each was zbin's own
     * time (its latency_ms: from the trigger's arrival to the decision made, the meter's exchange in it) and how much
     * the rest (the MQTT hops, and waiting for a CPU on the way), and how many came within {@link #NEAR} parts of another
     * slow one (a stretch in which the machine was slow, rather than parts slow on their own).
     *
     * @param each   the blocks' latencies, trigger → decision at the handler's client (ns), block by block in send order
     * @param seq0   the seq of the first block's first part; a block's are consecutive, {@code each[r].length} apart
     */
    static ObjectNode beyondFloor(long[][] each, long seq0, double floorP99) {
        long bound = Math.round(floorP99 * 1e6);
        Histogram own = new Histogram(60_000_000_000L, 3), rest = new Histogram(60_000_000_000L, 3);
        long slow = 0, ownBeyond = 0, unknown = 0;
        for (int r = 0; r < each.length; r++) {
            for (int i = 0; i < each[r].length; i++) {
                if (each[r][i] <= bound) continue;
                slow++;
                Long in = INSIDE_BY_SEQ.get(seq0 + (long) r * each[r].length + i);
                if (in == null) {
                    unknown++;
                    continue;
                }
                own.recordValue(in);
                if (in > bound) ownBeyond++;
                rest.recordValue(Math.max(1, each[r][i] - in));
            }
        }
        ObjectNode o = Json.object();
        o.put("decisions", slow);
        o.put("of", Arrays.stream(each).mapToLong(b -> b.length).sum());
        o.set("zbin_own_arrival_to_decided", json(own));
        o.put("zbin_own_alone_beyond_the_floor_p99", ownBeyond);
        o.set("the_rest_mqtt_hops_and_waiting_for_a_cpu", json(rest));
        o.put("within_" + NEAR + "_parts_of_another", slowNearAnother(each, bound));
        o.put("own_time_not_heard", unknown);
        return o;
    }

    /** How many of the values are above {@code bound} (ns). */
    static long above(long[][] each, long bound) {
        return Arrays.stream(each).flatMapToLong(Arrays::stream).filter(v -> v > bound).count();
    }

    /** How many of the values above {@code bound} (ns) have another above it within {@link #NEAR} places of the same block. */
    static long slowNearAnother(long[][] each, long bound) {
        long near = 0;
        for (long[] b : each) {
            for (int i = 0; i < b.length; i++) {
                if (b[i] <= bound) continue;
                for (int j = Math.max(0, i - NEAR); j <= Math.min(b.length - 1, i + NEAR); j++) {
                    if (j != i && b[j] > bound) {
                        near++;
                        break;
                    }
                }
            }
        }
        return near;
    }

    /** Which of this bench's histograms a decision's own latency_ms goes to, by its part name (null: none). */
    static Histogram insideOf(String payload) {
        return payload.contains("\"part\":\"P\"") ? INSIDE : payload.contains("\"part\":\"L") && payload.contains("0000,") ? INSIDE_LOT : null;
    }

    static MqttAsyncClient client(String url, Map<String, CompletableFuture<Long>> waiting, String... subs) throws Exception {
        return client(url, waiting, LineBench::insideOf, subs);
    }

    /**
     * A client that completes the future waiting for each answer's seq with the time it came, and records the answer's
     * own latency_ms (the line's figure, from the trigger's arrival to the decision made) in {@code inside}'s histogram.
     */
    static MqttAsyncClient client(String url, Map<String, CompletableFuture<Long>> waiting, java.util.function.Function<String, Histogram> insideFor,
                                  String... subs) throws Exception {
        MqttAsyncClient c = new MqttAsyncClient(url, "bench-" + System.nanoTime(), new MemoryPersistence());
        c.setCallback(new MqttCallback() {
            public void connectionLost(Throwable t) { }

            public void messageArrived(String topic, MqttMessage m) {
                String p = new String(m.getPayload(), StandardCharsets.UTF_8);
                int a = p.indexOf("\"seq\"");
                if (a < 0) return;
                int s = p.indexOf(':', a) + 1, e = s;
                while (e < p.length() && (Character.isDigit(p.charAt(e)) || p.charAt(e) == ' ')) e++;
                CompletableFuture<Long> f = waiting.get(p.substring(s, e).trim());
                if (f != null) f.complete(System.nanoTime());
                int l = p.indexOf("\"latency_ms\":");
                Histogram inside = insideFor.apply(p);
                if (l >= 0 && inside != null) { // the line's own figure: from the trigger's arrival to the decision made
                    int ls = l + 13, le = ls;
                    while (le < p.length() && "0123456789.eE-".indexOf(p.charAt(le)) >= 0) le++;
                    long ns = Math.max(1, Math.round(Double.parseDouble(p.substring(ls, le)) * 1e6));
                    synchronized (inside) {
                        inside.recordValue(ns);
                    }
                    if (AFTER_PAUSE_SEQS.remove(p.substring(s, e).trim())) synchronized (INSIDE_AFTER_PAUSE) { INSIDE_AFTER_PAUSE.recordValue(ns); }
                    if (inside == INSIDE) INSIDE_BY_SEQ.put(Long.parseLong(p.substring(s, e).trim()), ns);
                }
            }

            public void deliveryComplete(IMqttDeliveryToken t) { }
        });
        c.connect(options()).waitForCompletion(10_000);
        if (subs.length > 0) c.subscribe(subs, new int[subs.length]).waitForCompletion(10_000);
        return c;
    }

    /** The benches' MQTT clients' options: a clean session, a window above any burst they send, TCP_NODELAY as zbin's own. */
    static MqttConnectOptions options() {
        MqttConnectOptions o = new MqttConnectOptions();
        o.setCleanSession(true);
        o.setMaxInflight(5000);
        o.setSocketFactory(NoDelaySockets.plain());
        return o;
    }

    /** Request/response at a handler's pace: one message, wait for its answer, next slot. */
    static Histogram paced(MqttAsyncClient c, Map<String, CompletableFuture<Long>> waiting, String topic, String prefix, int n, int rate, long seq0)
            throws Exception {
        return paced(c, waiting, topic, prefix, n, rate, seq0, null);
    }

    /** As {@link #paced(MqttAsyncClient, Map, String, String, int, int, long)}, each latency also in {@code each} (ns, in order; when not null). */
    static Histogram paced(MqttAsyncClient c, Map<String, CompletableFuture<Long>> waiting, String topic, String prefix, int n, int rate, long seq0,
                           long[] each) throws Exception {
        Histogram h = new Histogram(60_000_000_000L, 3);
        long period = 1_000_000_000L / rate, next = System.nanoTime();
        for (int i = 0; i < n; i++) {
            String seq = Long.toString(seq0 + i);
            CompletableFuture<Long> f = new CompletableFuture<>();
            waiting.put(seq, f);
            long t0 = System.nanoTime();
            c.publish(topic, ("{\"seq\": " + seq + prefix + "}").getBytes(StandardCharsets.UTF_8), 1, false);
            long t1 = f.get(10, TimeUnit.SECONDS);
            waiting.remove(seq);
            h.recordValue(Math.max(1, t1 - t0));
            if (each != null) each[i] = Math.max(1, t1 - t0);
            next += period;
            long wait = next - System.nanoTime();
            if (wait > 0) TimeUnit.NANOSECONDS.sleep(wait);
            else next = System.nanoTime();
        }
        return h;
    }

    /** {@code n} request/response exchanges with the meter simulator, at {@code rate} per second (0: back to back), recorded in {@code h} (or not). */
    static void meterExchanges(OutputStream o, BufferedReader in, int n, int rate, Histogram h) throws Exception {
        meterExchanges(o, in, n, rate, h, null);
    }

    private static final byte[] METER_QUERY = "TRIG:RX?\n".getBytes(StandardCharsets.US_ASCII);

    /** One request/response with the meter simulator, as the floor and its relays make it: one reading asked, its line read. */
    static void meterExchange(OutputStream o, BufferedReader in) throws java.io.IOException {
        o.write(METER_QUERY);
        o.flush();
        in.readLine();
    }

    /** As {@link #meterExchanges(OutputStream, BufferedReader, int, int, Histogram)}, each latency also in {@code each} (ns, in order; when not null). */
    static void meterExchanges(OutputStream o, BufferedReader in, int n, int rate, Histogram h, long[] each) throws Exception {
        long period = rate == 0 ? 0 : 1_000_000_000L / rate, next = System.nanoTime();
        for (int i = 0; i < n; i++) {
            long t0 = System.nanoTime();
            meterExchange(o, in);
            long took = Math.max(1, System.nanoTime() - t0);
            if (h != null) h.recordValue(took);
            if (each != null) each[i] = took;
            if (rate == 0) continue;
            next += period;
            long wait = next - System.nanoTime();
            if (wait > 0) TimeUnit.NANOSECONDS.sleep(wait);
            else next = System.nanoTime();
        }
    }

    /** The daemon's threads in this JVM: its own (line-…, ticker, record-log-…, mqtt-…, overflow-…) and its MQTT client's (client id zbin-bench). */
    static boolean daemonThread(String n) {
        if (n.contains("zbin-bench")) return true;
        for (String p : new String[] {"line-", "ticker", "record-log-", "mqtt-outbox", "mqtt-redial", "overflow-"}) if (n.startsWith(p)) return true;
        return false;
    }

    /** The daemon's thread groups a CPU split is reported by: the measuring thread, its MQTT client's threads, the rest. */
    static String daemonGroup(String n) {
        return n.startsWith("line-") ? "measuring" : n.contains("zbin-bench") ? "mqtt_client" : "other";
    }

    /**
     * CPU time of the daemon's live threads by {@link #daemonGroup}: {total ns, user ns} per group. Where a decision's CPU
     * goes (the measuring thread's own work, or the MQTT client's threads and their hand-offs), and how much of it is
     * the kernel's (system = total − user).
     */
    static Map<String, long[]> daemonCpuByGroup() {
        java.lang.management.ThreadMXBean mx = java.lang.management.ManagementFactory.getThreadMXBean();
        Map<String, long[]> out = new java.util.TreeMap<>();
        for (java.lang.management.ThreadInfo ti : mx.getThreadInfo(mx.getAllThreadIds())) {
            if (ti == null || !daemonThread(ti.getThreadName())) continue;
            long c = mx.getThreadCpuTime(ti.getThreadId()), u = mx.getThreadUserTime(ti.getThreadId());
            if (c <= 0) continue;
            long[] g = out.computeIfAbsent(daemonGroup(ti.getThreadName()), k -> new long[2]);
            g[0] += c;
            g[1] += Math.max(0, u);
        }
        return out;
    }

    /** CPU time of the daemon's live threads, ns (a thread that ended in between is not counted: the figure is a floor). */
    static long daemonCpuNs() {
        java.lang.management.ThreadMXBean mx = java.lang.management.ManagementFactory.getThreadMXBean();
        long sum = 0;
        for (java.lang.management.ThreadInfo ti : mx.getThreadInfo(mx.getAllThreadIds())) {
            if (ti == null || !daemonThread(ti.getThreadName())) continue;
            long c = mx.getThreadCpuTime(ti.getThreadId());
            if (c > 0) sum += c;
        }
        return sum;
    }

    /**
     * The operating system's name of one of the daemon's threads (Linux keeps the first 15 characters): its own, and
     * its MQTT client's (Paho names them "MQTT Rec: " + the client id, here zbin-bench; the bench's clients are bench-…).
     */
    static boolean daemonTask(String comm) {
        if (comm.startsWith("MQTT ")) return comm.contains("zbin-") || comm.contains(": zbin");
        return daemonThread(comm);
    }

    /**
     * Voluntary thread switches (a thread going to sleep to wait for something: each is one wake-up) of a process's
     * threads that {@code which} accepts by name, from /proc/PID/task/TID/status (proc(5)). Unlike CPU time this is
     * a count: it does not move with the machine's speed.
     */
    static long switches(long pid, java.util.function.Predicate<String> which) throws java.io.IOException {
        long sum = 0;
        try (var tasks = Files.list(Path.of("/proc", Long.toString(pid), "task"))) {
            for (Path t : tasks.toList()) {
                try {
                    if (!which.test(Files.readString(t.resolve("comm")).strip())) continue;
                    for (String l : Files.readAllLines(t.resolve("status"))) {
                        if (l.startsWith("voluntary_ctxt_switches:")) sum += Long.parseLong(l.substring(l.indexOf(':') + 1).strip());
                    }
                } catch (java.io.IOException | RuntimeException gone) {
                    // the thread ended in between: its switches are not counted (the figure is a floor)
                }
            }
        }
        return sum;
    }

    /**
     * User + system CPU time of each thread of process {@code pid}, ns, summed by the thread's name with its digits taken
     * out ("GC Thread#0" and "GC Thread#1" are one group), from /proc/PID/task/TID/stat (a thread that ended is not counted).
     */
    static Map<String, Long> threadCpuNsByName(long pid) throws java.io.IOException {
        Map<String, Long> out = new java.util.TreeMap<>();
        threadCpuNs(pid, (comm, totalUser) -> out.merge(comm.replaceAll("[0-9]", ""), totalUser[0], Long::sum));
        return out;
    }

    /**
     * Hands each live thread of process {@code pid} to {@code each}: its name as the kernel keeps it and {total, user} CPU
     * time, ns, from /proc/PID/task/TID/stat (a thread that ends in between is left out).
     */
    static void threadCpuNs(long pid, java.util.function.BiConsumer<String, long[]> each) throws java.io.IOException {
        try (var tasks = Files.list(Path.of("/proc", Long.toString(pid), "task"))) {
            for (Path t : tasks.toList()) {
                String stat;
                try {
                    stat = Files.readString(t.resolve("stat"));
                } catch (java.io.IOException gone) {
                    continue; // the thread ended in between
                }
                String[] f = stat.substring(stat.lastIndexOf(')') + 2).split(" ");
                long user = Long.parseLong(f[11]) * 10_000_000L;
                each.accept(stat.substring(stat.indexOf('(') + 1, stat.lastIndexOf(')')), new long[] {statCpuNs(stat), user});
            }
        }
    }

    /** User + system CPU time of a process from /proc/PID/stat, ns (clock ticks of 10 ms, Linux's USER_HZ). */
    static long processCpuNs(long pid) throws java.io.IOException {
        return statCpuNs(Files.readString(Path.of("/proc", Long.toString(pid), "stat")));
    }

    /** utime + stime of a process's or thread's /proc stat line, ns: fields 14 and 15, in ticks of 10 ms (USER_HZ). */
    private static long statCpuNs(String stat) {
        String[] f = stat.substring(stat.lastIndexOf(')') + 2).split(" ");
        return (Long.parseLong(f[11]) + Long.parseLong(f[12])) * 10_000_000L;
    }

    /** How many of {@code h}'s values are at most {@code ms}. */
    static long count(Histogram h, double ms) { return h.getCountBetweenValues(0, Math.round(ms * 1e6)); }

    /** The machine's busy and total jiffies since boot, from the first line of /proc/stat (busy = all but idle and iowait). */
    static long[] machineJiffies() throws java.io.IOException {
        String[] f = Files.readAllLines(Path.of("/proc/stat")).get(0).trim().split("\\s+");
        long total = 0, idle = Long.parseLong(f[4]) + Long.parseLong(f[5]);
        for (int i = 1; i < f.length && i <= 8; i++) total += Long.parseLong(f[i]); // user … steal (proc(5)); guest is inside user
        return new long[] {total - idle, total};
    }

    /**
     * Writes into {@code o} a relayed floor's latency ({@code relay}) and the line's paced decisions against it: p50 over
     * it, p99 over its p99, how many within its p99 (of its own exchanges 99 % are, by definition). Returns {@code o}.
     */
    static ObjectNode againstRelay(ObjectNode o, Histogram relay, Histogram line) {
        double p50 = relay.getValueAtPercentile(50) / 1e6, p99 = relay.getValueAtPercentile(99) / 1e6;
        o.set("latency", json(relay));
        o.put("line_p50_over_it_ms", line.getValueAtPercentile(50) / 1e6 - p50);
        o.put("line_p99_over_its_p99", line.getValueAtPercentile(99) / 1e6 / p99);
        o.put("line_within_its_p99", count(line, p99));
        o.put("line", line.getTotalCount());
        o.put("own", relay.getTotalCount());
        return o;
    }

    static ObjectNode json(Histogram h) {
        ObjectNode n = Json.object();
        for (double p : new double[] {50, 99, 99.9}) n.put("p" + (p == 99.9 ? "999" : Integer.toString((int) p)) + "_ms", h.getValueAtPercentile(p) / 1e6);
        n.put("max_ms", h.getMaxValue() / 1e6);
        return n;
    }

    @Test
    void theLine_againstItsFloor() throws Exception {
        ObjectNode out = Json.object();
        out.put("machine", Runtime.getRuntime().availableProcessors() + " cores, " + System.getProperty("java.vm.name") + " " + System.getProperty("java.version"));
        try (MosquittoProcess broker = new MosquittoProcess(dir, "max_queued_messages 100000\n");
             // a daemon in a process of its own is set beside a relay in one too (BenchFloor.relayedProcess)
             BenchFloor floor = new BenchFloor(broker.url(), LineUnderBench.HOW.equals("jvm") ? BenchFloor.Relays.IN_JVM : BenchFloor.Relays.IN_JVM_AND_PROCESS)) {
            try (LineUnderBench rig = LineUnderBench.start(dir, broker.url(), flushMs())) {
                out.put("daemon", rig.where());
                System.out.println("  the daemon: " + rig.where());
                rig.contacts().load(new PartModel.Capacitor(100e-9, 0.02, 0, 0.01), 0);
                floor.meterAt(rig.meterPort());
                Histogram meterTight = floor.meterBackToBack(SAMPLES);
                // Warm parts first, as fast as they are answered, until the compiler's top tier has the path: a line in its
                // shift (the first decisions after a start are FreshStartBench's, in a process of their own). With 600 at
                // the pace, a run of this bench alone met code still ramping up in its first blocks (p50 1.49 ms there
                // against 1.02 in the lot-change blocks after them) and its figures depended on which benches this JVM ran
                // before it. The floor's code gets as many.
                Map<String, CompletableFuture<Long>> waiting = new ConcurrentHashMap<>();
                MqttAsyncClient handler = client(broker.url(), waiting, "zbin/bench/decision");
                // In lots, as a line in its shift has seen lot changes before. The daemon here shares the bench's JVM, whose
                // compiler is busy when its warm-up runs: that warm-up's lot changes ran before the code kept a profile, and
                // 15 000 parts of one lot let the compiler drop the lot-change branches; the first long lot then threw the
                // compiled trigger path away (five unstable_if traps on the measuring thread in the JIT's log), which a
                // `zbin run` process, whose warm-up is profiled, does not (see docs/performance-log.md).
                for (int w = 0; w < WARM_PARTS / WARM_LOT; w++)
                    paced(handler, waiting, "zbin/bench/trigger", ", \"part\": \"W\", \"lot\": \"BENCH-WARM-" + w + "\"", WARM_LOT,
                            Integer.MAX_VALUE, 10_000 + w * (long) WARM_LOT);
                // and a part without a lot, as the line's blocks send them: the warm lot goes on
                paced(handler, waiting, "zbin/bench/trigger", ", \"part\": \"W\"", 1, Integer.MAX_VALUE, 10_000 + WARM_PARTS);
                floor.warm(WARM_PARTS);
                // The line at a handler's pace and its floor, in alternating blocks: a shared machine's mood changes within
                // seconds, so each figure and its floor are taken over the same stretch of time.
                Histogram line = new Histogram(60_000_000_000L, 3);
                // The first decision after a floor block (seconds without a part), apart from the rest: the line's blocks
                // start so (same lot), and so do the long lots and every tenth short lot (a new lot). On a line a lot change
                // often follows a stop (a reel change); told apart, what a lot change costs in a running line shows beside
                // what a pause costs.
                Histogram afterPause = new Histogram(60_000_000_000L, 3), lotAfterPause = new Histogram(60_000_000_000L, 3),
                        lotRunning = new Histogram(60_000_000_000L, 3);
                // each phase's own floor blocks too, so a phase slower than another can be told from a machine slower then
                Histogram[] lineFloor = {new Histogram(60_000_000_000L, 3), new Histogram(60_000_000_000L, 3)};
                Histogram[] lotsFloor = {new Histogram(60_000_000_000L, 3), new Histogram(60_000_000_000L, 3)};
                int block = SAMPLES / ROUNDS;
                long[][] lineEach = new long[ROUNDS][block];
                for (int r = 0; r < ROUNDS; r++) {
                    floor.block(block, lineFloor[0], lineFloor[1]);
                    AFTER_PAUSE_SEQS.add(Long.toString(100_000 + r * block));
                    long[] first = new long[1], rest = new long[block - 1];
                    Histogram firstOfBlock = paced(handler, waiting, "zbin/bench/trigger", ", \"part\": \"P\"", 1, PACE, 100_000 + r * block, first);
                    afterPause.add(firstOfBlock);
                    line.add(firstOfBlock);
                    line.add(paced(handler, waiting, "zbin/bench/trigger", ", \"part\": \"P\"", block - 1, PACE, 100_000 + r * block + 1, rest));
                    lineEach[r][0] = first[0];
                    System.arraycopy(rest, 0, lineEach[r], 1, rest.length);
                }
                // A lot change every 1 000 parts at the handler's pace (a floor block between lots): every decision, and
                // the first of each new lot.
                Histogram lots = new Histogram(60_000_000_000L, 3), firstOfLot = new Histogram(60_000_000_000L, 3);
                for (int k = 0; k < LOTS; k++) {
                    floor.block(block, lotsFloor[0], lotsFloor[1]);
                    String lotPart = ", \"part\": \"L" + k + "\", \"lot\": \"BENCH-LOT-" + k + "\"";
                    AFTER_PAUSE_SEQS.add(Long.toString(300_000 + k * 10_000L));
                    Histogram first1 = paced(handler, waiting, "zbin/bench/trigger", lotPart, 1, PACE, 300_000 + k * 10_000L);
                    firstOfLot.add(first1);
                    lotAfterPause.add(first1);
                    lots.add(first1);
                    lots.add(paced(handler, waiting, "zbin/bench/trigger", lotPart, 999, PACE, 300_001 + k * 10_000L));
                }
                // Many short lots, so the first decision of a lot has a distribution and not five samples: a lot change
                // every SHORT_LOT parts, each lot's first decision beside the rest of that stretch.
                Histogram shortRest = new Histogram(60_000_000_000L, 3);
                for (int k = 0; k < SHORT_LOTS; k++) {
                    if (k % 10 == 0) {
                        floor.block(block / 2);
                        AFTER_PAUSE_SEQS.add(Long.toString(500_000 + k * 10_000L));
                    }
                    String lotPart = ", \"part\": \"L" + (LOTS + k) + "\", \"lot\": \"BENCH-SHORT-" + k + "\"";
                    Histogram first1 = paced(handler, waiting, "zbin/bench/trigger", lotPart, 1, PACE, 500_000 + k * 10_000L);
                    firstOfLot.add(first1);
                    (k % 10 == 0 ? lotAfterPause : lotRunning).add(first1);
                    shortRest.add(paced(handler, waiting, "zbin/bench/trigger", lotPart, SHORT_LOT - 1, PACE, 500_001 + k * 10_000L));
                }
                double floorP50 = floor.ms(50), floorP99 = floor.ms(99);
                out.set("echo", json(floor.echo));
                out.set("meter", json(floor.meter));
                out.set("meter_back_to_back", json(meterTight));
                out.put("floor_p50_ms", floorP50);
                out.put("floor_p99_ms", floorP99);
                out.set("line_at_" + PACE + "_per_s", json(line));
                out.set("lot_change_every_1000_at_" + PACE + "_per_s", json(lots));
                out.put("floor_p50_ms_of_the_line_blocks", BenchFloor.ms(lineFloor[0], lineFloor[1], 50));
                out.put("floor_p50_ms_of_the_lot_change_blocks", BenchFloor.ms(lotsFloor[0], lotsFloor[1], 50));
                ObjectNode fl = json(firstOfLot);
                fl.put("lots", firstOfLot.getTotalCount());
                fl.put("within_floor_p99", count(firstOfLot, floorP99));
                out.set("first_decision_of_a_lot", fl);
                out.set("floor_first_echo_after_a_pause", json(floor.firstEcho));
                out.set("floor_first_meter_exchange_after_a_pause", json(floor.firstMeter));
                ObjectNode ff = json(floor.firstExchange);
                ff.put("blocks", floor.firstExchange.getTotalCount());
                ff.put("within_floor_p99", count(floor.firstExchange, floorP99));
                out.set("floor_first_exchange_after_a_pause_echo_plus_meter", ff);
                for (var e : new Object[][] {{"first_decision_of_a_lot_after_a_pause", lotAfterPause}, {"first_decision_of_a_lot_in_a_running_line", lotRunning},
                        {"first_decision_after_a_pause_same_lot", afterPause}}) {
                    Histogram h = (Histogram) e[1];
                    ObjectNode o = json(h);
                    o.put("decisions", h.getTotalCount());
                    o.put("within_floor_p99", count(h, floorP99));
                    out.set((String) e[0], o);
                }
                out.set("rest_of_the_short_lots", json(shortRest));
                // the relayed floor (an echo whose responder makes the meter exchange before it answers, see BenchFloor)
                // beside the summed one: what of the line's figures the rig's overlap explains
                double relayedP50 = floor.relayedMs(50), relayedP99 = floor.relayedMs(99);
                ObjectNode rf = againstRelay(out.putObject("relayed_floor"), floor.relayed, line);
                rf.put("first_decisions_of_a_lot_after_a_pause_within_its_p99", count(lotAfterPause, relayedP99));
                rf.put("first_decisions_after_a_pause_same_lot_within_its_p99", count(afterPause, relayedP99));
                if (floor.relayedProcess.getTotalCount() > 0) { // the relay as a process of its own, as the daemon is here
                    double pp99 = floor.relayedProcess.getValueAtPercentile(99) / 1e6;
                    ObjectNode rp = againstRelay(out.putObject("relayed_floor_own_process"), floor.relayedProcess, line);
                    rp.put("lot_changes_within_its_p99", count(lots, pp99));
                    rp.put("lot_changes", lots.getTotalCount());
                    rp.put("first_decisions_of_a_lot_within_its_p99", count(firstOfLot, pp99));
                    rp.put("first_decisions_of_a_lot_after_a_pause_within_its_p99", count(lotAfterPause, pp99));
                }
                out.set("inside_zbin_arrival_to_decided", json(INSIDE));
                out.set("first_decision_of_a_lot_inside_zbin_arrival_to_decided", json(INSIDE_LOT));
                out.set("first_decision_after_a_pause_inside_zbin_arrival_to_decided", json(INSIDE_AFTER_PAUSE));
                ObjectNode slow = beyondFloor(lineEach, 100_000, floorP99);
                out.set("line_decisions_beyond_the_floor_p99", slow);
                // the relayed floor's own beyond the same bound in the same phase (its first ROUNDS blocks alternated with
                // the line's), and how they fall: a decision's hops and meter exchange without zbin
                long[][] relayedEach = floor.relayedEach.subList(0, ROUNDS).toArray(new long[0][]);
                long bound = Math.round(floorP99 * 1e6), relayedSlow = above(relayedEach, bound), relayedNear = slowNearAnother(relayedEach, bound);
                long relayedN = Arrays.stream(relayedEach).mapToLong(b -> b.length).sum();
                ObjectNode rs = slow.putObject("relayed_floor_in_the_same_phase");
                rs.put("beyond", relayedSlow);
                rs.put("of", relayedN);
                rs.put("within_" + NEAR + "_of_another", relayedNear);
                System.out.printf(Locale.ROOT, "%n  %-52s %9s %9s %9s %9s%n", "latency at " + PACE + "/s, ms", "p50", "p99", "p99.9", "max");
                for (var e : new Object[][] {{"floor: MQTT echo", floor.echo}, {"floor: meter request/response", floor.meter},
                        {"  (meter back to back, not the floor)", meterTight},
                        {"relayed floor: echo with the meter exchange in it", floor.relayed}, {"trigger -> decision", line}, {"  of it inside zbin: arrival -> decided", INSIDE},
                        {"a lot change every 1 000 parts (" + LOTS + " lots)", lots},
                        {"the first decision of a lot (" + firstOfLot.getTotalCount() + " lots)", firstOfLot}, {"  of it inside zbin: arrival -> decided", INSIDE_LOT},
                        {"the first decision after a pause, inside zbin (" + INSIDE_AFTER_PAUSE.getTotalCount() + ")", INSIDE_AFTER_PAUSE},
                        {"  the rest of the " + SHORT_LOTS + " short lots (" + SHORT_LOT + " parts)", shortRest}}) {
                    Histogram h = (Histogram) e[1];
                    System.out.printf(Locale.ROOT, "  %-52s %9.3f %9.3f %9.3f %9.3f%n", e[0], h.getValueAtPercentile(50) / 1e6,
                            h.getValueAtPercentile(99) / 1e6, h.getValueAtPercentile(99.9) / 1e6, h.getMaxValue() / 1e6);
                }
                System.out.printf(Locale.ROOT, "  floor (echo + meter): p50 %.3f ms, p99 %.3f ms; targets p50 <= %.3f, p99 <= %.3f%n", floorP50, floorP99,
                        floorP50 + 0.2, 1.5 * floorP99);
                System.out.printf(Locale.ROOT, "  the floor's p50 in the line's phase %.3f ms, in the lot changes' %.3f ms (the targets use the whole run's)%n",
                        BenchFloor.ms(lineFloor[0], lineFloor[1], 50), BenchFloor.ms(lotsFloor[0], lotsFloor[1], 50));
                System.out.printf(Locale.ROOT, "  within the floor's p99: %d of %d lots' first decisions, %d of %d of the rest of the short lots%n",
                        count(firstOfLot, floorP99), firstOfLot.getTotalCount(), count(shortRest, floorP99), shortRest.getTotalCount());
                System.out.printf(Locale.ROOT, "    of the lots' first decisions: after a pause (a floor block) %d of %d, in a running line %d of %d;"
                        + " the first after a pause in the same lot (the line's blocks) %d of %d (p50 %.3f ms, max %.3f)%n",
                        count(lotAfterPause, floorP99), lotAfterPause.getTotalCount(), count(lotRunning, floorP99), lotRunning.getTotalCount(),
                        count(afterPause, floorP99), afterPause.getTotalCount(), afterPause.getValueAtPercentile(50) / 1e6, afterPause.getMaxValue() / 1e6);
                System.out.printf(Locale.ROOT, "    the floor's own first exchange after a pause (echo + meter, %d blocks): p50 %.3f ms, max %.3f ms;"
                        + " within the floor's p99 %d of %d%n",
                        floor.firstEcho.getTotalCount(), BenchFloor.ms(floor.firstEcho, floor.firstMeter, 50),
                        (floor.firstEcho.getMaxValue() + floor.firstMeter.getMaxValue()) / 1e6,
                        count(floor.firstExchange, floorP99), floor.firstExchange.getTotalCount());
                System.out.printf(Locale.ROOT, "  against the relayed floor (p50 %.3f, p99 %.3f ms): the line's p50 %+.3f ms over it, its p99 %.2f x it;"
                        + " within its p99 (99 %% of its own, by definition): the line %d of %d, the lots' first after a pause %d of %d, the first after a pause in the same lot %d of %d%n",
                        relayedP50, relayedP99, line.getValueAtPercentile(50) / 1e6 - relayedP50, line.getValueAtPercentile(99) / 1e6 / relayedP99,
                        count(line, relayedP99), line.getTotalCount(),
                        count(lotAfterPause, relayedP99), lotAfterPause.getTotalCount(), count(afterPause, relayedP99), afterPause.getTotalCount());
                if (floor.relayedProcess.getTotalCount() > 0) {
                    double pp99 = floor.relayedProcess.getValueAtPercentile(99) / 1e6;
                    System.out.printf(Locale.ROOT, "  against the relayed floor with its responder a process of its own (p50 %.3f, p99 %.3f ms): the line's p99 %.2f x it;"
                            + " within its p99: the line %d of %d, the lot changes %d of %d, the lots' first %d of %d (after a pause %d of %d)%n",
                            floor.relayedProcess.getValueAtPercentile(50) / 1e6, pp99, line.getValueAtPercentile(99) / 1e6 / pp99,
                            count(line, pp99), line.getTotalCount(), count(lots, pp99), lots.getTotalCount(),
                            count(firstOfLot, pp99), firstOfLot.getTotalCount(), count(lotAfterPause, pp99), lotAfterPause.getTotalCount());
                }
                System.out.printf(Locale.ROOT, "  the line's decisions beyond the floor's p99: %d of %d; of each, zbin's own time (arrival -> decided, the meter's"
                        + " exchange in it) p50 %.3f, max %.3f ms (%d beyond the floor's p99 by it alone), the rest (MQTT hops, waiting for a CPU)"
                        + " p50 %.3f, max %.3f ms; %d of them within %d parts (%d ms) of another; the relayed floor's in the same blocks' phase %d of %d, %d near another%n",
                        slow.get("decisions").asLong(), slow.get("of").asLong(), slow.get("zbin_own_arrival_to_decided").get("p50_ms").asDouble(),
                        slow.get("zbin_own_arrival_to_decided").get("max_ms").asDouble(), slow.get("zbin_own_alone_beyond_the_floor_p99").asLong(),
                        slow.get("the_rest_mqtt_hops_and_waiting_for_a_cpu").get("p50_ms").asDouble(),
                        slow.get("the_rest_mqtt_hops_and_waiting_for_a_cpu").get("max_ms").asDouble(), slow.get("within_" + NEAR + "_parts_of_another").asLong(),
                        NEAR, NEAR * 1000 / PACE, relayedSlow, relayedN, relayedNear);

                // Open loop: triggers at a fixed rate without waiting; every one must be answered exactly once.
                ObjectNode rates = out.putObject("open_loop");
                AtomicLong answered = new AtomicLong(), dup = new AtomicLong(), busy = new AtomicLong();
                Map<String, Boolean> seen = new ConcurrentHashMap<>();
                Map<String, Long> sentAt = new ConcurrentHashMap<>();
                Histogram openLat = new Histogram(60_000_000_000L, 3);
                MqttAsyncClient counter = new MqttAsyncClient(broker.url(), "bench-count-" + System.nanoTime(), new MemoryPersistence());
                counter.setCallback(new MqttCallback() {
                    public void connectionLost(Throwable t) { }

                    public void messageArrived(String topic, MqttMessage m) {
                        String p = new String(m.getPayload(), StandardCharsets.UTF_8);
                        int a = p.indexOf("\"part\"");
                        String part = p.substring(a, p.indexOf(',', a));
                        if (seen.putIfAbsent(part, true) != null) dup.incrementAndGet();
                        Long t0 = sentAt.remove(part.substring(part.indexOf(':') + 1).replace("\"", "").trim());
                        if (t0 != null) synchronized (openLat) { openLat.recordValue(Math.max(1, System.nanoTime() - t0)); }
                        if (p.contains("\"line-busy\"")) busy.incrementAndGet(); // answered, but not measured
                        answered.incrementAndGet();
                    }

                    public void deliveryComplete(IMqttDeliveryToken t) { }
                });
                MqttConnectOptions co = new MqttConnectOptions();
                co.setSocketFactory(NoDelaySockets.plain());
                co.setMaxInflight(5000);
                counter.connect(co).waitForCompletion(10_000);
                counter.subscribe("zbin/bench/decision", 1).waitForCompletion(10_000);
                int shortS = Integer.getInteger("zbin.bench.seconds", 10), longS = Integer.getInteger("zbin.bench.long.seconds", 60);
                long seq = 1_000_000, self = ProcessHandle.current().pid();
                for (int rate : new int[] {1000, 2000, 3000, 4000}) {
                    int seconds = rate == LONG_RATE ? longS : shortS;
                    answered.set(0);
                    dup.set(0);
                    busy.set(0);
                    seen.clear();
                    sentAt.clear();
                    synchronized (openLat) { openLat.reset(); }
                    Map<String, long[]> groups0 = rig.cpuByGroup();
                    long cpu0 = rig.cpuNs(), broker0 = processCpuNs(broker.pid()), jvm0 = processCpuNs(self);
                    long zbinSw0 = rig.switches(), brokerSw0 = switches(broker.pid(), c -> true);
                    long[] machine0 = machineJiffies();
                    long n = (long) rate * seconds, period = 1_000_000_000L / rate, next = System.nanoTime(), start = next;
                    for (long i = 0; i < n; i++, seq++) {
                        sentAt.put("R" + rate + "-" + i, System.nanoTime());
                        while (true) {
                            try {
                                handler.publish("zbin/bench/trigger", ("{\"seq\": " + seq + ", \"part\": \"R" + rate + "-" + i + "\", \"lot\": \"BENCH\"}")
                                        .getBytes(StandardCharsets.UTF_8), 1, false);
                                break;
                            } catch (MqttException e) {
                                if (e.getReasonCode() != MqttException.REASON_CODE_MAX_INFLIGHT) throw e;
                                Thread.onSpinWait();
                            }
                        }
                        next += period;
                        long wait = next - System.nanoTime();
                        if (wait > 0) TimeUnit.NANOSECONDS.sleep(wait);
                    }
                    double sendS = (System.nanoTime() - start) / 1e9;
                    long end = System.currentTimeMillis() + 20_000;
                    while (answered.get() < n && System.currentTimeMillis() < end) Thread.sleep(20);
                    double doneS = (System.nanoTime() - start) / 1e9;
                    long daemonNs = rig.cpuNs() - cpu0, brokerNs = processCpuNs(broker.pid()) - broker0, jvmNs = processCpuNs(self) - jvm0;
                    long[] machine1 = machineJiffies();
                    double zbinUs = daemonNs / 1e3 / Math.max(1, answered.get());
                    Map<String, long[]> groups1 = rig.cpuByGroup();
                    double zbinSw = (double) (rig.switches() - zbinSw0) / Math.max(1, answered.get());
                    double brokerSw = (double) (switches(broker.pid(), c -> true) - brokerSw0) / Math.max(1, answered.get());
                    double brokerUs = brokerNs / 1e3 / Math.max(1, answered.get());
                    // Cores in use over the run: zbin's threads, the rest of this JVM (the fixed-rate client, the meter
                    // simulator, GC and JIT), Mosquitto, and the whole machine (anything else running counts here too).
                    double wallNs = doneS * 1e9, cores = Runtime.getRuntime().availableProcessors();
                    double zbinCores = daemonNs / wallNs, rigCores = Math.max(0, rig.inBenchJvm() ? jvmNs - daemonNs : jvmNs) / wallNs, brokerCores = brokerNs / wallNs;
                    double machineBusy = (double) (machine1[0] - machine0[0]) / Math.max(1, machine1[1] - machine0[1]) * cores;
                    ObjectNode r = rates.putObject(Integer.toString(rate));
                    double p50, p99;
                    synchronized (openLat) {
                        p50 = openLat.getValueAtPercentile(50) / 1e6;
                        p99 = openLat.getValueAtPercentile(99) / 1e6;
                    }
                    r.put("p50_ms", p50);
                    r.put("p99_ms", p99);
                    r.put("zbin_cpu_us_per_decision", zbinUs);
                    r.put("broker_cpu_us_per_decision", brokerUs);
                    r.put("zbin_thread_switches_per_decision", zbinSw);
                    r.put("broker_thread_switches_per_decision", brokerSw);
                    r.put("sent", n);
                    r.put("answered", answered.get());
                    r.put("duplicated", dup.get());
                    r.put("line_busy", busy.get());
                    r.put("send_s", sendS);
                    r.put("all_answered_after_s", doneS);
                    r.put("cores_zbin", zbinCores);
                    r.put("cores_rig_client_meter_gc_jit", rigCores);
                    r.put("cores_mosquitto", brokerCores);
                    r.put("cores_machine_busy", machineBusy);
                    r.put("machine_cores", cores);
                    System.out.printf(Locale.ROOT, "  open loop %5d/s for %ds: %d sent in %.1f s, %d answered (%d duplicated, %d line-busy), all answered after %.1f s;"
                                    + " trigger -> decision p50 %.1f ms, p99 %.1f ms; CPU per decision: zbin %.0f µs, Mosquitto %.0f µs (%.1f ×)%n",
                            rate, seconds, n, sendS, answered.get(), dup.get(), busy.get(), doneS, p50, p99, zbinUs, brokerUs, zbinUs / brokerUs);
                    System.out.printf(Locale.ROOT, "    cores in use: zbin %.2f, the rest of the bench JVM (client, meter simulator, GC, JIT) %.2f, Mosquitto %.2f;"
                            + " the machine %.2f of %.0f%n", zbinCores, rigCores, brokerCores, machineBusy, cores);
                    System.out.printf(Locale.ROOT, "    thread switches per decision: zbin %.2f, Mosquitto %.2f%n", zbinSw, brokerSw);
                    ObjectNode split = r.putObject("zbin_cpu_us_per_decision_by_thread");
                    StringBuilder byThread = new StringBuilder("    zbin's CPU per decision by thread (of it in the kernel):");
                    for (var g : groups1.entrySet()) {
                        long[] before = groups0.getOrDefault(g.getKey(), new long[2]);
                        double totalUs = (g.getValue()[0] - before[0]) / 1e3 / Math.max(1, answered.get());
                        double userUs = (g.getValue()[1] - before[1]) / 1e3 / Math.max(1, answered.get());
                        ObjectNode gn = split.putObject(g.getKey());
                        gn.put("total", totalUs);
                        gn.put("system", Math.max(0, totalUs - userUs));
                        byThread.append(String.format(Locale.ROOT, " %s %.0f µs (%.0f)", g.getKey().replace('_', ' '), totalUs, Math.max(0, totalUs - userUs)));
                    }
                    System.out.println(byThread);
                    assertEquals(n, answered.get(), "every trigger answered at " + rate + "/s");
                    assertEquals(0, dup.get());
                }
                counter.disconnect().waitForCompletion(5000);
                handler.disconnect().waitForCompletion(5000);
            }
        }
        Files.createDirectories(Path.of("target/bench"));
        Files.writeString(Path.of("target/bench/line.json"), Json.mapper().writerWithDefaultPrettyPrinter().writeValueAsString(out));
    }
}
