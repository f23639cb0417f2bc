package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;

import com.fasterxml.jackson.databind.node.ObjectNode;
import java.io.BufferedReader;
import java.io.InputStreamReader;
import java.io.OutputStream;
import java.net.Socket;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Locale;
import java.util.Map;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicLong;
import net.zbin.io.Json;
import net.zbin.io.mqtt.NoDelaySockets;
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
 * one request/response with the meter simulator at zero measurement time; the first 100 decisions after
 * start against the handler's deadline; and open-loop rates with lost and duplicated decisions counted. The line
 * and its floor are measured in alternating blocks of the same run, so a shared machine's changing load weighs on both.
 * Run with {@code mvn -B -Pbench test}; results in {@code target/bench/line.json}.
 */
class LineBench {
    static final int PACE = 200, SAMPLES = 3000, LOTS = 5, ROUNDS = 6;

    @TempDir
    Path dir;

    /** Inside zbin, per decision of the paced run: its own latency_ms, from the trigger's arrival to the decision made (ns). */
    static final Histogram INSIDE = new Histogram(60_000_000_000L, 3);
    /** The same figure for the first 100 decisions after start. */
    static final Histogram INSIDE_FIRST = new Histogram(60_000_000_000L, 3);
    /** The same figure for the first decision of each new lot. */
    static final Histogram INSIDE_LOT = new Histogram(60_000_000_000L, 3);

    static MqttAsyncClient client(String url, Map<String, CompletableFuture<Long>> waiting, String... subs) throws Exception {
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
                Histogram inside = p.contains("\"part\":\"P\"") ? INSIDE : p.contains("\"part\":\"F\"") ? INSIDE_FIRST
                        : p.contains("\"part\":\"L") && p.contains("0000,") ? INSIDE_LOT : null;
                if (l >= 0 && inside != null) { // the line's own figure: from the trigger's arrival to the decision made
                    int ls = l + 13, le = ls;
                    while (le < p.length() && "0123456789.eE-".indexOf(p.charAt(le)) >= 0) le++;
                    synchronized (inside) {
                        inside.recordValue(Math.max(1, Math.round(Double.parseDouble(p.substring(ls, le)) * 1e6)));
                    }
                }
            }

            public void deliveryComplete(IMqttDeliveryToken t) { }
        });
        MqttConnectOptions o = new MqttConnectOptions();
        o.setCleanSession(true);
        o.setMaxInflight(5000);
        o.setSocketFactory(NoDelaySockets.plain());
        c.connect(o).waitForCompletion(10_000);
        if (subs.length > 0) c.subscribe(subs, new int[subs.length]).waitForCompletion(10_000);
        return c;
    }

    /** Request/response at a handler's pace: one message, wait for its answer, next slot. */
    static Histogram paced(MqttAsyncClient c, Map<String, CompletableFuture<Long>> waiting, String topic, String prefix, int n, int rate, long seq0)
            throws Exception {
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
            next += period;
            long wait = next - System.nanoTime();
            if (wait > 0) TimeUnit.NANOSECONDS.sleep(wait);
            else next = System.nanoTime();
        }
        return h;
    }

    /** {@code n} request/response exchanges with the meter simulator, at {@code rate} per second (0: back to back), recorded in {@code h} (or not). */
    static void meterExchanges(OutputStream o, BufferedReader in, int n, int rate, Histogram h) throws Exception {
        long period = rate == 0 ? 0 : 1_000_000_000L / rate, next = System.nanoTime();
        for (int i = 0; i < n; i++) {
            long t0 = System.nanoTime();
            o.write("TRIG:RX?\n".getBytes(StandardCharsets.US_ASCII));
            o.flush();
            in.readLine();
            if (h != null) h.recordValue(Math.max(1, System.nanoTime() - t0));
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

    /** User + system CPU time of a process from /proc/PID/stat, ns (clock ticks of 10 ms, Linux's USER_HZ). */
    static long processCpuNs(long pid) throws java.io.IOException {
        String stat = java.nio.file.Files.readString(java.nio.file.Path.of("/proc", Long.toString(pid), "stat"));
        String[] f = stat.substring(stat.lastIndexOf(')') + 2).split(" ");
        return (Long.parseLong(f[11]) + Long.parseLong(f[12])) * 10_000_000L; // fields 14 and 15 of stat (utime, stime)
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
        try (MosquittoProcess broker = new MosquittoProcess(dir, "max_queued_messages 100000\n")) {
            // Floor 1: a bare MQTT echo through the same broker.
            Map<String, CompletableFuture<Long>> echoWaiting = new ConcurrentHashMap<>();
            MqttAsyncClient echo = client(broker.url(), new ConcurrentHashMap<>());
            echo.setCallback(new MqttCallback() {
                public void connectionLost(Throwable t) { }

                public void messageArrived(String topic, MqttMessage m) throws MqttException { echo.publish("bench/resp", m.getPayload(), 1, false); }

                public void deliveryComplete(IMqttDeliveryToken t) { }
            });
            echo.subscribe("bench/req", 1).waitForCompletion(10_000);
            MqttAsyncClient req = client(broker.url(), echoWaiting, "bench/resp");
            paced(req, echoWaiting, "bench/req", "", 500, PACE, 0);

            try (LineRig rig = new LineRig(dir, "bench", broker.url(), LineRig.quietMeter(Scenario.builtIn()), "mlcc-x7r-100n",
                    "handler: {deadline_ms: 150}\n");
                 Socket meter = new Socket("127.0.0.1", rig.meterServer.port())) {
                rig.contacts.load(new PartModel.Capacitor(100e-9, 0.02, 0, 0.01), 0);
                // Floor 2: one request/response with the meter simulator at zero measurement time, at the line's pace
                // (as the echo and the line are; back to back, both threads stay hot and the figure is lower: kept beside it).
                meter.setTcpNoDelay(true);
                OutputStream mo = meter.getOutputStream();
                BufferedReader mi = new BufferedReader(new InputStreamReader(meter.getInputStream(), StandardCharsets.US_ASCII));
                Histogram meterH = new Histogram(60_000_000_000L, 3), meterTight = new Histogram(60_000_000_000L, 3);
                meterExchanges(mo, mi, 500, 0, null);
                meterExchanges(mo, mi, SAMPLES, 0, meterTight);
                // The first 100 decisions after start.
                Map<String, CompletableFuture<Long>> waiting = new ConcurrentHashMap<>();
                MqttAsyncClient handler = client(broker.url(), waiting, "zbin/bench/decision");
                Histogram first = paced(handler, waiting, "zbin/bench/trigger", ", \"part\": \"F\"", 100, PACE, 0);
                paced(handler, waiting, "zbin/bench/trigger", ", \"part\": \"W\"", 500, PACE, 10_000);
                // The line at a handler's pace and its floor, in alternating blocks: a shared machine's mood changes within
                // seconds, so each figure and its floor are taken over the same stretch of time.
                Histogram echoH = new Histogram(60_000_000_000L, 3), line = new Histogram(60_000_000_000L, 3);
                int block = SAMPLES / ROUNDS;
                for (int r = 0; r < ROUNDS; r++) {
                    echoH.add(paced(req, echoWaiting, "bench/req", "", block, PACE, 1_000_000 + r * block));
                    meterExchanges(mo, mi, block, PACE, meterH);
                    line.add(paced(handler, waiting, "zbin/bench/trigger", ", \"part\": \"P\"", block, PACE, 100_000 + r * block));
                }
                // A lot change every 1 000 parts at the handler's pace: every decision, and the first of each new lot.
                Histogram lots = new Histogram(60_000_000_000L, 3), firstOfLot = new Histogram(60_000_000_000L, 3);
                for (int k = 0; k < LOTS; k++) {
                    String lotPart = ", \"part\": \"L" + k + "\", \"lot\": \"BENCH-LOT-" + k + "\"";
                    Histogram first1 = paced(handler, waiting, "zbin/bench/trigger", lotPart, 1, PACE, 300_000 + k * 10_000L);
                    firstOfLot.add(first1);
                    lots.add(first1);
                    lots.add(paced(handler, waiting, "zbin/bench/trigger", lotPart, 999, PACE, 300_001 + k * 10_000L));
                }
                double floorP50 = (echoH.getValueAtPercentile(50) + meterH.getValueAtPercentile(50)) / 1e6;
                double floorP99 = (echoH.getValueAtPercentile(99) + meterH.getValueAtPercentile(99)) / 1e6;
                out.set("echo", json(echoH));
                out.set("meter", json(meterH));
                out.set("meter_back_to_back", json(meterTight));
                out.put("floor_p50_ms", floorP50);
                out.put("floor_p99_ms", floorP99);
                out.set("line_at_" + PACE + "_per_s", json(line));
                out.set("first_100_after_start", json(first));
                out.set("lot_change_every_1000_at_" + PACE + "_per_s", json(lots));
                out.set("first_decision_of_a_lot", json(firstOfLot));
                out.set("inside_zbin_arrival_to_decided", json(INSIDE));
                out.set("first_100_inside_zbin_arrival_to_decided", json(INSIDE_FIRST));
                out.set("first_decision_of_a_lot_inside_zbin_arrival_to_decided", json(INSIDE_LOT));
                System.out.printf(Locale.ROOT, "%n  %-46s %9s %9s %9s %9s%n", "latency at " + PACE + "/s, ms", "p50", "p99", "p99.9", "max");
                for (var e : new Object[][] {{"floor: MQTT echo", echoH}, {"floor: meter request/response", meterH},
                        {"  (meter back to back, not the floor)", meterTight}, {"trigger -> decision", line}, {"  of it inside zbin: arrival -> decided", INSIDE},
                        {"first 100 decisions after start", first}, {"  of it inside zbin: arrival -> decided", INSIDE_FIRST}, {"a lot change every 1 000 parts (" + LOTS + " lots)", lots},
                        {"  the first decision of each lot", firstOfLot}, {"    of it inside zbin: arrival -> decided", INSIDE_LOT}}) {
                    Histogram h = (Histogram) e[1];
                    System.out.printf(Locale.ROOT, "  %-46s %9.3f %9.3f %9.3f %9.3f%n", e[0], h.getValueAtPercentile(50) / 1e6,
                            h.getValueAtPercentile(99) / 1e6, h.getValueAtPercentile(99.9) / 1e6, h.getMaxValue() / 1e6);
                }
                System.out.printf(Locale.ROOT, "  floor (echo + meter): p50 %.3f ms, p99 %.3f ms; targets p50 <= %.3f, p99 <= %.3f%n", floorP50, floorP99,
                        floorP50 + 0.2, 1.5 * floorP99);

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
                int seconds = Integer.getInteger("zbin.bench.seconds", 10);
                long seq = 1_000_000;
                for (int rate : new int[] {1000, 2000, 3000, 4000}) {
                    answered.set(0);
                    dup.set(0);
                    busy.set(0);
                    seen.clear();
                    sentAt.clear();
                    synchronized (openLat) { openLat.reset(); }
                    long cpu0 = daemonCpuNs(), broker0 = processCpuNs(broker.pid());
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
                    double zbinUs = (daemonCpuNs() - cpu0) / 1e3 / Math.max(1, answered.get());
                    double brokerUs = (processCpuNs(broker.pid()) - broker0) / 1e3 / Math.max(1, answered.get());
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
                    r.put("sent", n);
                    r.put("answered", answered.get());
                    r.put("duplicated", dup.get());
                    r.put("line_busy", busy.get());
                    r.put("send_s", sendS);
                    r.put("all_answered_after_s", doneS);
                    System.out.printf(Locale.ROOT, "  open loop %5d/s for %ds: %d sent in %.1f s, %d answered (%d duplicated, %d line-busy), all answered after %.1f s;"
                                    + " trigger -> decision p50 %.1f ms, p99 %.1f ms; CPU per decision: zbin %.0f µs, Mosquitto %.0f µs (%.1f ×)%n",
                            rate, seconds, n, sendS, answered.get(), dup.get(), busy.get(), doneS, p50, p99, zbinUs, brokerUs, zbinUs / brokerUs);
                    assertEquals(n, answered.get(), "every trigger answered at " + rate + "/s");
                    assertEquals(0, dup.get());
                }
                counter.disconnect().waitForCompletion(5000);
                handler.disconnect().waitForCompletion(5000);
            }
            req.disconnect().waitForCompletion(5000);
            echo.disconnect().waitForCompletion(5000);
        }
        Files.createDirectories(Path.of("target/bench"));
        Files.writeString(Path.of("target/bench/line.json"), Json.mapper().writerWithDefaultPrettyPrinter().writeValueAsString(out));
    }
}
