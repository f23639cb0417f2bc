package net.zbin.sim;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.node.ObjectNode;
import java.util.Map;
import java.util.TreeMap;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.TimeoutException;
import java.util.concurrent.atomic.AtomicLong;
import java.util.function.Consumer;
import javax.net.SocketFactory;
import org.HdrHistogram.Histogram;
import org.eclipse.paho.client.mqttv3.IMqttDeliveryToken;
import org.eclipse.paho.client.mqttv3.MqttAsyncClient;
import org.eclipse.paho.client.mqttv3.MqttConnectOptions;
import org.eclipse.paho.client.mqttv3.MqttMessage;
import org.eclipse.paho.client.mqttv3.persist.MemoryPersistence;

/**
 * The handler simulator: presents each part of a lot, triggers, and waits for the decision within
 * its deadline as a real handler does (one part on the contacts at a time). Retest verdicts are
 * re-presented with {@code retest_of}; every {@code checkEvery} parts an open, a short and a
 * reference check go through; every {@code repeatEvery} parts a trigger is sent twice on purpose.
 * It counts missing, duplicate, late and contradictory decisions, and answers that are not about the
 * part on the contacts (stale: another part's decision, or a repeat answer to a new presentation), and
 * stops feeding while the state topic says the line is offline. It may restart its seq counter mid-run,
 * as a rebooted handler does. Its memory is bounded: the last {@value #REMEMBERED} presentations.
 */
public final class HandlerSim implements AutoCloseable {
    private static final ObjectMapper JSON = new ObjectMapper();
    static final int REMEMBERED = 10_000;

    /**
     * @param broker      broker URL
     * @param topicRoot   first topic level
     * @param line        line id
     * @param parts       parts to run
     * @param ratePerS    presentations per second at most
     * @param deadlineMs  a decision later than this is late
     * @param missingMs   a decision not here after this is missing
     * @param checkEvery  open/short/reference checks after every this many parts (0: none)
     * @param repeatEvery send a trigger twice after every this many parts (0: never)
     * @param maxRetests  re-presentations of one part at most
     * @param clientId    MQTT client id
     * @param sockets     socket factory for the broker connection (TCP_NODELAY)
     * @param username    null for anonymous
     * @param password    null for none
     * @param offlineWaitMs how long to wait for the line to come (back) online before giving up
     * @param seqRestartEvery restart the seq counter at 0 after every this many parts (0: never), as a rebooted handler does
     */
    public record Options(String broker, String topicRoot, String line, long parts, double ratePerS, int deadlineMs,
                          int missingMs, int checkEvery, int repeatEvery, int maxRetests, String clientId,
                          SocketFactory sockets, String username, char[] password, long offlineWaitMs, long seqRestartEvery) {
        public Options(String broker, String topicRoot, String line, long parts, double ratePerS, int deadlineMs,
                       int missingMs, int checkEvery, int repeatEvery, int maxRetests, String clientId,
                       SocketFactory sockets, String username, char[] password, long offlineWaitMs) {
            this(broker, topicRoot, line, parts, ratePerS, deadlineMs, missingMs, checkEvery, repeatEvery, maxRetests, clientId,
                    sockets, username, password, offlineWaitMs, 0);
        }

        public Options withSeqRestartEvery(long n) {
            return new Options(broker, topicRoot, line, parts, ratePerS, deadlineMs, missingMs, checkEvery, repeatEvery, maxRetests,
                    clientId, sockets, username, password, offlineWaitMs, n);
        }
    }

    /** Live progress, for a progress line. */
    public record Progress(long parts, long decided, double uph, double yieldPct, int lastBin, String lastGrade) {}

    /**
     * Final counts. {@code bins} and {@code reasons} hold the final decision of each finished part; a part
     * is finished when its last decision is pass or fail (not missing, not still a retest). {@code duplicateAnswers}
     * names the presentations counted in {@code duplicate} (the first 100): seq/part, whether sent again, and the two answers.
     */
    public record Summary(long parts, long triggers, long decisions, Map<Integer, Long> bins, Map<String, Long> reasons,
                          long passed, long missing, long duplicate, long late, long contradictory, long repeatsAnswered,
                          long retests, long checksPassed, long checksFailed, double p50Ms, double p99Ms, double maxMs,
                          long offlinePauses, long finished, long stale, long seqRestarts, Map<Integer, String> grades,
                          long deliberateRepeats, long resent, long passedOnOpenOrShort, java.util.List<String> duplicateAnswers) {
        /** Parts passed / parts finished, the same figure the dashboard and a replay of the record log give. */
        public double yieldPct() { return finished == 0 ? Double.NaN : 100.0 * passed / finished; }
    }

    private final Options o;
    private final Scenario scenario;
    private final PartLoader loader;
    private final MqttAsyncClient client;
    private final Map<String, CompletableFuture<JsonNode>> waiting = new ConcurrentHashMap<>();
    /** What a presentation was answered: enough to tell a contradictory repeat. */
    private record Answer(int bin, String verdict, String reason) {}

    /** Answers by presentation (seq and part), the last {@value #REMEMBERED}: bounded, and small per entry. */
    private final Map<String, Answer> answered = java.util.Collections.synchronizedMap(new java.util.LinkedHashMap<>() {
        @Override
        protected boolean removeEldestEntry(Map.Entry<String, Answer> e) { return size() > REMEMBERED; }
    });
    private final AtomicLong duplicate = new AtomicLong(), contradictory = new AtomicLong(), repeatsAnswered = new AtomicLong(),
            stale = new AtomicLong(), resent = new AtomicLong();
    /**
     * Each presentation answered twice as new (the first {@value #NAMED_DUPLICATES}): its seq/part, whether it was sent
     * again, and the two answers. Counted in {@link #duplicate} under its own lock, so a summary's count and names agree
     * even when a late copy arrives as the summary is taken.
     */
    private static final int NAMED_DUPLICATES = 100;
    private final java.util.List<String> duplicates = new java.util.ArrayList<>();
    /** Presentations whose trigger was sent again (no answer in time): a repeat answer to them is expected. */
    private final java.util.Set<String> retried = java.util.Collections.newSetFromMap(java.util.Collections.synchronizedMap(
            new java.util.LinkedHashMap<>() {
                @Override
                protected boolean removeEldestEntry(Map.Entry<String, Boolean> e) { return size() > REMEMBERED; }
            }));
    private final Object stateLock = new Object();
    private final java.util.concurrent.ScheduledExecutorService redial = java.util.concurrent.Executors.newSingleThreadScheduledExecutor(r -> {
        Thread t = new Thread(r, "handler-redial");
        t.setDaemon(true);
        return t;
    });
    private volatile boolean connectedBefore;
    private volatile boolean online;
    private long seq;

    public HandlerSim(Options options, Scenario scenario, PartLoader loader) throws Exception {
        this.o = options;
        this.scenario = scenario;
        this.loader = loader;
        this.client = new MqttAsyncClient(o.broker(), o.clientId(), new MemoryPersistence());
        String base = o.topicRoot() + "/" + o.line() + "/";
        client.setCallback(new org.eclipse.paho.client.mqttv3.MqttCallbackExtended() {
            public void connectionLost(Throwable cause) { setOnline(false); }

            public void connectComplete(boolean reconnect, String uri) {
                if (!connectedBefore) {
                    connectedBefore = true; // the constructor subscribes after the first connect, and waits for it
                    return;
                }
                try {
                    client.subscribe(new String[] {base + "decision", base + "state"}, new int[] {1, 1}); // clean session: again
                } catch (org.eclipse.paho.client.mqttv3.MqttException e) {
                    setOnline(false);
                }
            }

            public void messageArrived(String topic, MqttMessage m) { onMessage(topic, m.getPayload()); }

            public void deliveryComplete(IMqttDeliveryToken t) { }
        });
        // No Paho offline buffer: after a reconnect it can keep every later message, the resubscription too, while
        // the client says it is connected. A trigger sent while the broker is away is sent again by send().
        MqttConnectOptions c = new MqttConnectOptions();
        c.setMqttVersion(MqttConnectOptions.MQTT_VERSION_3_1_1);
        c.setCleanSession(true);
        // Not Paho's automatic reconnect: it retries once a second. The redial thread looks five times a second.
        c.setAutomaticReconnect(false);
        c.setMaxInflight(1000);
        if (o.sockets() != null) c.setSocketFactory(o.sockets());
        if (o.username() != null) c.setUserName(o.username());
        if (o.password() != null) c.setPassword(o.password());
        BrokerDial.connectAndSubscribe(client, c, new String[] {base + "decision", base + "state"}, new int[] {1, 1}, 10_000);
        redial.scheduleWithFixedDelay(() -> {
            if (client.isConnected()) return;
            try {
                client.connect(c);
            } catch (Exception e) {
                // still connecting, or the broker is not back yet: look again
            }
        }, 200, 200, TimeUnit.MILLISECONDS);
    }

    private void setOnline(boolean v) {
        synchronized (stateLock) {
            online = v;
            stateLock.notifyAll();
        }
    }

    private void onMessage(String topic, byte[] payload) {
        JsonNode n;
        try {
            n = JSON.readTree(payload);
        } catch (Exception e) {
            return;
        }
        if (topic.endsWith("/state")) {
            setOnline(n.path("online").asBoolean(false));
            return;
        }
        long s = n.path("seq").asLong(-1);
        boolean repeat = n.path("repeat").asBoolean(false);
        String key = s + "/" + n.path("part").asText();
        Answer first = answered.putIfAbsent(key, new Answer(n.path("bin").asInt(), n.path("verdict").asText(), n.path("reason").asText()));
        if (first == null && repeat && !retried.contains(key)) {
            stale.incrementAndGet(); // a repeat answer to a presentation sent once and never answered: it is about another part
            return;
        }
        if (first != null) {
            if (!repeat) {
                String named = key + (retried.contains(key) ? " (sent again)" : " (sent once)") + ": first " + first.verdict() + "/"
                        + first.reason() + ", then " + n.path("verdict").asText() + "/" + n.path("reason").asText();
                synchronized (duplicates) {
                    if (duplicate.incrementAndGet() <= NAMED_DUPLICATES) duplicates.add(named);
                }
            } else {
                repeatsAnswered.incrementAndGet();
                if (first.bin() != n.path("bin").asInt() || !first.verdict().equals(n.path("verdict").asText()))
                    contradictory.incrementAndGet();
            }
            return;
        }
        CompletableFuture<JsonNode> f = waiting.get(key);
        if (f != null) f.complete(n);
    }

    private void awaitOnline() throws InterruptedException, TimeoutException {
        long end = System.currentTimeMillis() + o.offlineWaitMs();
        synchronized (stateLock) {
            paused = true;
            try {
                while (!online) {
                    long left = end - System.currentTimeMillis();
                    if (left <= 0) throw new TimeoutException("line " + o.line() + " did not come online within " + o.offlineWaitMs() + " ms");
                    stateLock.wait(left);
                }
            } finally {
                paused = false;
            }
        }
    }

    private volatile boolean paused;
    private final java.util.concurrent.atomic.AtomicLong triggersSent = new java.util.concurrent.atomic.AtomicLong();

    /** True while the handler waits for the line to come (back) online, feeding nothing. */
    public boolean pausedForLine() { return paused; }

    /** Trigger messages published so far (first sends and re-sends). */
    public long triggersSent() { return triggersSent.get(); }

    private JsonNode trigger(String kind, String part, long retestOf) throws Exception {
        long s = seq++;
        String key = s + "/" + part;
        answered.remove(key); // a reused seq: whatever was answered to it before was for another presentation
        CompletableFuture<JsonNode> f = new CompletableFuture<>();
        waiting.put(key, f);
        ObjectNode t = JSON.createObjectNode();
        t.put("seq", s);
        t.put("part", part);
        t.put("lot", scenario.lot().id());
        t.put("kind", kind);
        if (retestOf >= 0) t.put("retest_of", retestOf);
        byte[] msg = JSON.writeValueAsBytes(t);
        String topic = o.topicRoot() + "/" + o.line() + "/trigger";
        send(topic, msg);
        long end = System.currentTimeMillis() + o.missingMs();
        long retryMs = Math.max(500, 4L * o.deadlineMs());
        try {
            while (true) {
                long left = end - System.currentTimeMillis();
                if (left <= 0) return null;
                try {
                    JsonNode d = f.get(Math.min(left, retryMs), TimeUnit.MILLISECONDS);
                    if (!part.equals(d.path("part").asText())) stale.incrementAndGet();
                    return d;
                } catch (TimeoutException e) {
                    // no answer within the handler's patience: send the same trigger again, as a handler does
                    retried.add(key);
                    resent.incrementAndGet();
                    send(topic, msg);
                }
            }
        } finally {
            waiting.remove(key);
        }
    }

    /** Publishes, riding out a broker that is away: tries again until the client has reconnected. */
    private void send(String topic, byte[] msg) throws Exception {
        long end = System.currentTimeMillis() + o.offlineWaitMs();
        while (true) {
            try {
                client.publish(topic, msg, 1, false);
                if (topic.endsWith("/trigger")) triggersSent.incrementAndGet();
                return;
            } catch (org.eclipse.paho.client.mqttv3.MqttException e) {
                if (System.currentTimeMillis() > end) throw e;
                Thread.sleep(50);
            }
        }
    }

    /** Triggers sent again because no answer came in time. */
    public long resent() { return resent.get(); }

    /** Runs the lot; the progress consumer is called after each part. */
    public Summary run(Consumer<Progress> progress) throws Exception {
        LotGenerator gen = new LotGenerator(scenario, scenario.seed() + 1);
        Map<Integer, Long> bins = new TreeMap<>();
        Map<String, Long> reasons = new TreeMap<>();
        Histogram lat = new Histogram(60_000_000L, 3);
        java.util.ArrayDeque<Long> lastMinute = new java.util.ArrayDeque<>();
        long passedNotThere = 0;
        long triggers = 0, deliberate = 0, decisions = 0, passed = 0, missing = 0, late = 0, retests = 0, checksOk = 0, checksBad = 0, pauses = 0;
        long finished = 0, restarts = 0;
        Map<Integer, String> grades = new TreeMap<>();
        long periodNs = o.ratePerS() > 0 ? (long) (1e9 / o.ratePerS()) : 0;
        long next = System.nanoTime(), start = next;
        for (long i = 0; i < o.parts(); i++) {
            if (!online) {
                pauses++;
                awaitOnline();
            }
            if (o.seqRestartEvery() > 0 && i > 0 && i % o.seqRestartEvery() == 0) {
                seq = 0; // the handler rebooted: its counter starts again
                restarts++;
            }
            LotGenerator.SimPart p = gen.next();
            long retestOf = -1;
            JsonNode d = null;
            for (int attempt = 0; attempt <= o.maxRetests(); attempt++) {
                loader.present(p);
                long t0 = System.nanoTime();
                d = trigger("part", p.partId(), retestOf);
                triggers++;
                if (d == null) { missing++; break; }
                decisions++;
                double ms = (System.nanoTime() - t0) / 1e6;
                lat.recordValue(Math.min(60_000_000L, Math.round(ms * 1000)));
                if (ms > o.deadlineMs()) late++;
                if (!"retest".equals(d.path("verdict").asText())) break;
                retestOf = d.path("seq").asLong();
                if (attempt < o.maxRetests()) retests++;
            }
            if (d != null && !"retest".equals(d.path("verdict").asText())) {
                finished++;
                bins.merge(d.path("bin").asInt(), 1L, Long::sum);
                grades.putIfAbsent(d.path("bin").asInt(), d.path("grade").asText());
                reasons.merge(d.path("reason").asText(), 1L, Long::sum);
                if ("pass".equals(d.path("verdict").asText())) {
                    passed++;
                    // the contacts were open or shorted: a pass can only be a reading of something else (another part)
                    if (p.state() != Contacts.State.PART) passedNotThere++;
                }
            }
            if (d != null) {
                if (o.repeatEvery() > 0 && (i + 1) % o.repeatEvery() == 0) {
                    JsonNode again = repeatLast(d);
                    triggers++;
                    deliberate++;
                    if (again == null) missing++;
                }
            }
            if (o.checkEvery() > 0 && (i + 1) % o.checkEvery() == 0) {
                long[] ok = checks(gen);
                checksOk += ok[0];
                checksBad += ok[1];
                triggers += 3;
                missing += ok[2];
            }
            // UPH over the last minute (the rate now, as the dashboard's uph), not an average since the start
            long nowNs = System.nanoTime();
            lastMinute.add(nowNs);
            while (nowNs - lastMinute.peekFirst() > 60_000_000_000L) lastMinute.pollFirst();
            double spanH = Math.min(60e9, nowNs - start) / 3.6e12;
            progress.accept(new Progress(i + 1, decisions, spanH > 0 ? lastMinute.size() / spanH : 0, finished == 0 ? Double.NaN : 100.0 * passed / finished,
                    d == null ? -1 : d.path("bin").asInt(), d == null ? "missing" : d.path("grade").asText()));
            next += periodNs;
            long wait = next - System.nanoTime();
            if (wait > 0) TimeUnit.NANOSECONDS.sleep(wait);
            else next = System.nanoTime();
        }
        Thread.sleep(200); // late duplicates still arrive
        boolean any = lat.getTotalCount() > 0;
        long duplicated;
        java.util.List<String> named;
        synchronized (duplicates) {
            duplicated = duplicate.get();
            named = java.util.List.copyOf(duplicates);
        }
        return new Summary(o.parts(), triggers, decisions, bins, reasons, passed, missing, duplicated, late,
                contradictory.get(), repeatsAnswered.get(), retests, checksOk, checksBad,
                any ? lat.getValueAtPercentile(50) / 1000.0 : Double.NaN, any ? lat.getValueAtPercentile(99) / 1000.0 : Double.NaN,
                any ? lat.getMaxValue() / 1000.0 : Double.NaN, pauses, finished, stale.get(), restarts, grades, deliberate, resent.get(),
                passedNotThere, named);
    }

    /** Sends the trigger of decision d again: the answer must be a repeat with the same bin. */
    private JsonNode repeatLast(JsonNode d) throws Exception {
        long s = d.path("seq").asLong();
        long before = repeatsAnswered.get();
        ObjectNode t = JSON.createObjectNode();
        t.put("seq", s);
        t.put("part", d.path("part").asText());
        t.put("lot", scenario.lot().id());
        client.publish(o.topicRoot() + "/" + o.line() + "/trigger", JSON.writeValueAsBytes(t), 1, false);
        long end = System.currentTimeMillis() + o.missingMs();
        while (repeatsAnswered.get() == before && System.currentTimeMillis() < end) Thread.sleep(1);
        return repeatsAnswered.get() > before ? d : null;
    }

    /** Open, short and reference checks: [passed, failed, missing]. */
    private long[] checks(LotGenerator gen) throws Exception {
        long[] r = new long[3];
        loader.presentOpen();
        count(check("open", "check-open"), r);
        loader.presentShort();
        count(check("short", "check-short"), r);
        loader.presentReference(gen.reference());
        count(check("reference", "check-reference"), r);
        return r;
    }

    /** One check presentation; one the line did not measure (verdict retest: paused, busy, stale) is presented again. */
    private JsonNode check(String kind, String id) throws Exception {
        JsonNode d = trigger(kind, id, -1);
        for (int i = 0; i < o.maxRetests() && d != null && "retest".equals(d.path("verdict").asText()); i++) d = trigger(kind, id, -1);
        return d;
    }

    private static void count(JsonNode d, long[] r) {
        if (d == null) r[2]++;
        else if ("pass".equals(d.path("verdict").asText())) r[0]++;
        else r[1]++;
    }

    @Override
    public void close() {
        redial.shutdownNow();
        try {
            if (client.isConnected()) client.disconnect(1000).waitForCompletion(2000);
            client.close(true);
        } catch (Exception ignored) {
            // closing
        }
        loader.close();
    }
}
