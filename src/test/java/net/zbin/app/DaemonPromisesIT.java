package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicLong;
import net.zbin.io.mqtt.NoDelaySockets;
import net.zbin.sim.HandlerSim;
import net.zbin.sim.PartLoader;
import net.zbin.sim.PartModel;
import net.zbin.sim.Scenario;
import net.zbin.sim.SimTcpServer;
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
 * The daemon keeps its promises with clients that misbehave and outages that happen, through a
 * Mosquitto each test starts: reused seqs, bursts, a broker that dies, a meter that dies.
 */
class DaemonPromisesIT {
    static final ObjectMapper M = new ObjectMapper();

    @TempDir
    Path dir;

    HandlerSim.Options handler(LineRig rig, long parts, double rate, int missingMs) {
        return new HandlerSim.Options(rig.cfg.mqtt().broker(), "zbin", rig.line, parts, rate, 150, missingMs, 0, 0, 3,
                "handler-" + rig.line + "-" + System.nanoTime(), NoDelaySockets.plain(), null, null, 60_000);
    }

    static JsonNode lastDashboard(Tap tap) throws Exception {
        List<Tap.Msg> d = tap.on("/dashboard");
        return d.get(d.size() - 1).json();
    }

    @Test
    void aHandlerThatRestartsItsSeq_getsEveryPartMeasured_andEachReuseIsCounted() throws Exception {
        try (MosquittoProcess broker = new MosquittoProcess(dir, "");
             LineRig rig = new LineRig(dir, "reuse", broker.url(), LineRig.quietMeter(Scenario.builtIn()), "mlcc-x7r-100n",
                     "dashboard: {interval_s: 0.2}\n");
             Tap tap = new Tap(broker.url(), "zbin/reuse/dashboard")) {
            HandlerSim.Summary s;
            try (HandlerSim h = new HandlerSim(handler(rig, 1000, 200, 5000).withSeqRestartEvery(250), rig.scenario,
                    PartLoader.direct(rig.contacts))) {
                s = h.run(p -> { });
            }
            assertEquals(3, s.seqRestarts());
            assertEquals(0, s.stale(), "no answer about another part");
            assertEquals(0, s.missing());
            assertEquals(0, s.duplicate(), () -> "duplicate: " + s.duplicateAnswers());
            assertEquals(0, s.contradictory());
            long rows = 0;
            for (Path f : rig.recordFiles()) rows += Files.readAllLines(f).size() - 1;
            assertEquals(s.triggers(), rows, "every presentation measured and recorded, none answered from memory");
            // The next dashboard that has every part (bounded wait, no sleep): it must count each reuse.
            JsonNode dash = tap.await(m -> m.topic().endsWith("/dashboard") && m.json().path("parts").asLong() == s.finished(), 1, 30_000)
                    .get(0).json();
            assertTrue(dash.path("seq_reused").asLong() >= 3 * 200, "each reuse counted: " + dash);
        }
    }

    @Test
    void theFirstHundredDecisionsAfterStart_takeNoLongerThanWarmOnes() throws Exception {
        try (MosquittoProcess broker = new MosquittoProcess(dir, "");
             LineRig rig = new LineRig(dir, "warm", broker.url(), LineRig.quietMeter(Scenario.builtIn()), "mlcc-x7r-100n", "");
             Tap tap = new Tap(broker.url(), "zbin/warm/decision")) {
            rig.contacts.load(new PartModel.Capacitor(100e-9, 0.02, 0, 0.01), 0);
            // The first 100 after start against the next 100 of the same run (the floor): a cold path shows in the median,
            // while a single scheduling hiccup of a loaded machine does not.
            double[] first = insideMs(tap, 0, 100);
            double[] warm = insideMs(tap, 100, 100);
            double firstMedian = median(first), warmMedian = median(warm);
            System.out.printf("first 100 decisions after start, inside zbin: median %.3f ms, worst %.2f ms; the next 100: median %.3f ms,"
                    + " worst %.2f ms (deadline 150 ms)%n", firstMedian, max(first), warmMedian, max(warm));
            assertTrue(firstMedian <= 3 * warmMedian + 0.5, "the first 100 as quick as warm ones: median " + firstMedian
                    + " ms against " + warmMedian + " ms");
        }
    }

    /** The decisions' own latency_ms (trigger arrived → decided) for n triggers sent one at a time from seq {@code from}. */
    static double[] insideMs(Tap tap, int from, int n) throws Exception {
        double[] ms = new double[n];
        for (int i = 0; i < n; i++) {
            final int seq = from + i;
            tap.publish("zbin/warm/trigger", "{\"seq\": " + seq + ", \"part\": \"W" + seq + "\"}");
            ms[i] = tap.await(m -> m.json().path("seq").asLong() == seq, 1, 30_000).get(0).json().path("latency_ms").asDouble();
        }
        return ms;
    }

    static double median(double[] v) {
        double[] c = v.clone();
        java.util.Arrays.sort(c);
        return c[c.length / 2];
    }

    static double max(double[] v) {
        return java.util.Arrays.stream(v).max().orElse(Double.NaN);
    }

    @Test
    void theMeterDiesAndComesBack_theLineIsReadyAgainByItself() throws Exception {
        try (MosquittoProcess broker = new MosquittoProcess(dir, "");
             LineRig rig = new LineRig(dir, "heal", broker.url(), LineRig.quietMeter(Scenario.builtIn()), "mlcc-x7r-100n", "");
             Tap tap = new Tap(broker.url(), "zbin/heal/state", "zbin/heal/alarm", "zbin/heal/decision")) {
            rig.contacts.load(new PartModel.Capacitor(100e-9, 0.02, 0, 0.01), 0);
            int port = rig.meterServer.port();
            rig.meterServer.close();
            tap.publish("zbin/heal/trigger", "{\"seq\": 1, \"part\": \"P1\"}");
            tap.await(m -> m.topic().endsWith("/state") && m.json().path("mode").asText().equals("fault"), 1, 10_000);
            tap.await(m -> m.topic().endsWith("/alarm") && m.json().path("active").asBoolean(), 1, 5_000);
            int before = tap.msgs.size();
            long t0 = System.nanoTime();
            try (SimTcpServer again = new SimTcpServer(rig.meter, port)) {
                // No trigger is sent: the daemon finds the meter by itself.
                tap.awaitFrom(before, m -> m.topic().endsWith("/state")
                        && m.json().path("mode").asText().equals("ready"), 1, 10_000);
                // The backoff schedule itself is held by ReconnectBackoffTest (counts, not clocks); here the figure is printed.
                System.out.printf("meter back: line ready after %.2f s (the profile's maximum backoff is 2 s)%n", (System.nanoTime() - t0) / 1e9);
                tap.awaitFrom(before, m -> m.topic().endsWith("/alarm") && !m.json().path("active").asBoolean(), 1, 5_000);
                JsonNode d = tap.present("heal", 2); // again after a stale-trigger, as a handler does (a loaded machine)
                assertEquals("J", d.path("grade").asText());
            }
        }
    }

    @Test
    void theBrokerDiesFiveTimesDuringALot_noTriggerGoesWithoutAnAnswer_noBinContradicts() throws Exception {
        try (MosquittoProcess broker = new MosquittoProcess(dir, "");
             // A short keep-alive: a connection the broker's death leaves half-open is found within seconds, not minutes.
             LineRig rig = new LineRig(dir, "outage", broker.url(), LineRig.quietMeter(Scenario.builtIn()), "mlcc-x7r-100n", "",
                     "topic_root: zbin, keepalive_s: 2}")) {
            ExecutorService run = Executors.newSingleThreadExecutor();
            HandlerSim h = new HandlerSim(handler(rig, 2000, 150, 60_000), rig.scenario, PartLoader.direct(rig.contacts));
            java.util.concurrent.atomic.AtomicLong presented = new java.util.concurrent.atomic.AtomicLong();
            Future<HandlerSim.Summary> f = run.submit(() -> h.run(p -> presented.set(p.parts())));
            List<Double> readyAfterS = new ArrayList<>();
            for (int i = 0; i < 5; i++) {
                TestLine.awaitParts(presented, 200L * (i + 1), f); // a kill every 200 parts, however fast the machine is
                broker.kill();
                Thread.sleep(500);
                long t0 = System.nanoTime();
                broker.start();
                readyAfterS.add(untilOnline(broker.url(), "zbin/outage/state", t0));
            }
            HandlerSim.Summary s = f.get(5, TimeUnit.MINUTES);
            h.close();
            run.shutdown();
            System.out.println("broker restarts: line ready again after " + readyAfterS + " s; triggers resent " + h.resent());
            assertEquals(0, s.missing(), "every trigger answered, after the handler's retry where needed");
            assertEquals(0, s.contradictory());
            assertEquals(0, s.stale());
            assertEquals(0, s.duplicate(), () -> "duplicate: " + s.duplicateAnswers());
            // Typically 0.4 s (the redial every 100 ms); a connection left half-open by the kill is found by the 2 s keep-alive.
            // Each return was awaited (untilOnline, a bounded 20 s); the figures are printed above, not held to a clock.
        }
    }

    /** Seconds from t0 until a fresh client sees the line's state online again. */
    static double untilOnline(String url, String stateTopic, long t0) throws Exception {
        long end = System.nanoTime() + TimeUnit.SECONDS.toNanos(20);
        while (System.nanoTime() < end) {
            try (Tap t = new Tap(url, stateTopic)) {
                long until = System.nanoTime() + 100_000_000L;
                while (System.nanoTime() < until) {
                    if (t.msgs.stream().anyMatch(m -> m.json().path("online").asBoolean())) return (System.nanoTime() - t0) / 1e9;
                    Thread.sleep(5);
                }
            } catch (Exception e) {
                Thread.sleep(20); // broker not accepting yet
            }
        }
        throw new AssertionError("line not online again within 20 s");
    }

    @Test
    void aBurstOfValidAndMalformedTriggers_everyValidOneAnswered_everyMalformedOneRejected() throws Exception {
        try (MosquittoProcess broker = new MosquittoProcess(dir, "max_inflight_messages 0\n");
             LineRig rig = new LineRig(dir, "burst", broker.url(), LineRig.quietMeter(Scenario.builtIn()), "mlcc-x7r-100n", "")) {
            rig.contacts.load(new PartModel.Capacitor(100e-9, 0.02, 0, 0.01), 0);
            Map<Long, Long> answers = new ConcurrentHashMap<>();
            AtomicLong rejected = new AtomicLong(), busy = new AtomicLong();
            MqttAsyncClient c = new MqttAsyncClient(broker.url(), "burst-" + System.nanoTime(), new MemoryPersistence());
            c.setCallback(new MqttCallback() {
                public void connectionLost(Throwable t) { }

                public void messageArrived(String topic, MqttMessage m) throws Exception {
                    if (topic.endsWith("/rejected")) { rejected.incrementAndGet(); return; }
                    JsonNode j = M.readTree(m.getPayload());
                    answers.merge(j.path("seq").asLong(), 1L, Long::sum);
                    if (j.path("reason").asText().equals("line-busy")) busy.incrementAndGet();
                }

                public void deliveryComplete(IMqttDeliveryToken t) { }
            });
            MqttConnectOptions o = new MqttConnectOptions();
            o.setMaxInflight(1000);
            o.setCleanSession(true);
            o.setSocketFactory(NoDelaySockets.plain());
            net.zbin.sim.BrokerDial.connectAndSubscribe(c, o, new String[] {"zbin/burst/decision", "zbin/burst/rejected"}, new int[] {1, 1}, 10_000);
            long t0 = System.nanoTime();
            for (int i = 0; i < 30_000; i++) {
                String p = i % 3 == 2 ? "{\"seq\": \"bad-" + i + "\"}" : "{\"seq\": " + i + ", \"part\": \"B" + i + "\", \"lot\": \"BURST\"}";
                while (true) {
                    try {
                        c.publish("zbin/burst/trigger", p.getBytes(), 1, false);
                        break;
                    } catch (MqttException e) {
                        if (e.getReasonCode() != MqttException.REASON_CODE_MAX_INFLIGHT) throw e;
                        Thread.sleep(1);
                    }
                }
            }
            double sendS = (System.nanoTime() - t0) / 1e9;
            long end = System.currentTimeMillis() + 120_000;
            while ((answers.size() < 20_000 || rejected.get() < 10_000) && System.currentTimeMillis() < end) Thread.sleep(50);
            System.out.printf("burst: 30 000 sent in %.1f s; %d answered (%d line-busy), %d rejected%n", sendS, answers.size(), busy.get(), rejected.get());
            assertEquals(20_000, answers.size(), "every valid trigger answered");
            assertTrue(answers.values().stream().allMatch(n -> n == 1), "exactly once");
            assertEquals(10_000, rejected.get(), "every malformed one rejected");
            Set<Long> seqs = answers.keySet();
            assertTrue(seqs.stream().allMatch(s -> s % 3 != 2));
            c.disconnect().waitForCompletion(5000);
            c.close();
        }
    }
}
