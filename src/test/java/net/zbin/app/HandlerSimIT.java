package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.TimeUnit;
import net.zbin.core.TestConditions;
import net.zbin.io.meter.MeterProfileLoader;
import net.zbin.io.meter.ProfileMeterSession;
import net.zbin.io.meter.TransportSpec;
import net.zbin.io.mqtt.NoDelaySockets;
import net.zbin.sim.HandlerSim;
import net.zbin.sim.PartLoader;
import net.zbin.sim.Scenario;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The simulators as tools: the handler waits for the line, the meter and lot commands run from the jar. */
class HandlerSimIT {
    static EmbeddedBroker broker;

    @BeforeAll
    static void up() throws Exception { broker = new EmbeddedBroker(Files.createTempDirectory("moquette-h")); }

    @AfterAll
    static void down() { broker.close(); }

    @TempDir
    Path dir;

    @Test
    void handlerStopsFeedingWhileTheLineIsOffline_andResumesWhenItComesOnline() throws Exception {
        Scenario sc = LineRig.quietMeter(Scenario.builtIn());
        net.zbin.sim.Contacts contacts = new net.zbin.sim.Contacts();
        HandlerSim.Options o = new HandlerSim.Options(broker.url(), "zbin", "late", 50, 100, 150, 5000, 0, 0, 3, "h-late",
                NoDelaySockets.plain(), null, null, 30_000);
        CompletableFuture<HandlerSim.Summary> run = new CompletableFuture<>();
        LineRig[] rig = new LineRig[1];
        try (HandlerSim h = new HandlerSim(o, sc, PartLoader.direct(contacts))) {
            Thread t = new Thread(() -> {
                try {
                    run.complete(h.run(p -> { }));
                } catch (Exception e) {
                    run.completeExceptionally(e);
                }
            });
            t.start();
            // No sleep to prove nothing was fed: wait (bounded) until the handler says it is waiting for the line, then
            // check it sent no trigger on the way there.
            long until = System.currentTimeMillis() + 30_000;
            while (!h.pausedForLine() && !run.isDone() && System.currentTimeMillis() < until) java.util.concurrent.locks.LockSupport.parkNanos(1_000_000);
            assertTrue(h.pausedForLine() && !run.isDone(), "the handler waits for the line");
            assertEquals(0, h.triggersSent(), "nothing fed while no line is online");
            rig[0] = new LineRig(dir, "late", broker.url(), sc, "mlcc-x7r-100n", "", null, contacts);
            HandlerSim.Summary s = run.get(60, TimeUnit.SECONDS);
            assertEquals(1, s.offlinePauses());
            assertEquals(0, s.missing());
            assertEquals(50, s.parts());
            assertTrue(s.passed() > 40, "parts were really measured: " + s);
        } finally {
            if (rig[0] != null) rig[0].close();
        }
    }

    @Test
    void simMeterCommand_servesTheShippedProfileOnTcp() throws Exception {
        Process p = new ProcessBuilder("java", "-jar", Jar.path(), "sim", "meter", "--tcp", "0", "--time-scale", "0").start();
        try {
            String first = new java.io.BufferedReader(new java.io.InputStreamReader(p.getInputStream(), StandardCharsets.UTF_8)).readLine();
            assertTrue(first != null && first.contains("listening on 127.0.0.1:"), first);
            int port = Integer.parseInt(first.substring(first.lastIndexOf(':') + 1).trim());
            try (ProfileMeterSession s = ProfileMeterSession.open(MeterProfileLoader.load(Path.of("config/meters/zbin-sim.yaml"))
                    .withTransport(TransportSpec.tcp("127.0.0.1", port)), Clock.systemUTC())) {
                assertTrue(s.identify().startsWith("ZBIN,SIMLCR"));
                s.apply(new TestConditions(1000, 1, "fast", 1));
                assertTrue(s.measure().reading().isFinite());
            }
        } finally {
            p.destroy();
            p.waitFor(10, TimeUnit.SECONDS);
        }
    }

    @Test
    void simLotCommand_writesALotThatReplays() throws Exception {
        Path lot = dir.resolve("lot.csv");
        Cli w = Cli.run("sim", "lot", "--parts", "3000", "--out", lot.toString(), "--scenario", "simulators/scenarios/harrowgate-inductor-4u7.yaml");
        assertEquals(0, w.exit(), w.err());
        Cli r = Cli.run("replay", "--recipe", "config/recipes/inductor-pwr-4u7.yaml", "--in", lot.toString(), "--json");
        assertEquals(0, r.exit(), r.err());
        var json = new com.fasterxml.jackson.databind.ObjectMapper().readTree(r.out());
        assertEquals(3000, json.path("presentations").asLong(), "each simulated part presented once");
        assertEquals(3000 - json.path("retests").asLong(), json.path("total").asLong(), "unclean first presentations are retests");
        assertTrue(json.path("yield_pct").asDouble() > 50, r.out());
        assertTrue(json.path("reasons").has("q-low"), "the lot's low-Q tail is caught by the Q gate: " + r.out());
    }

    @Test
    void simHandlerCommand_loadsPartsIntoARemoteMeterSimulator() throws Exception {
        try (LineRig rig = new LineRig(dir, "remote", broker.url(), LineRig.quietMeter(Scenario.builtIn()), "mlcc-x7r-100n", "")) {
            rig.compensate();
            Cli c = Cli.run("sim", "handler", "--broker", broker.url(), "--line", "remote", "--parts", "200", "--rate", "100",
                    "--meter-sim", "127.0.0.1:" + rig.meterServer.port(), "--repeat-every", "20", "--check-every", "100");
            assertEquals(0, c.exit(), c.out() + c.err());
            assertTrue(c.out().contains("200 parts"), c.out());
            assertTrue(c.out().contains("missing 0, duplicate 0, contradictory 0"), c.out());
            assertTrue(c.out().contains("10 deliberate repeats") && c.out().contains("answered as repeats 10"), c.out());
            assertTrue(c.out().contains("fixture checks: 6 passed, 0 failed"), c.out());
        }
    }

    /**
     * A misbehaving line that answers every trigger twice as new: the handler simulator counts each presentation as a
     * duplicate and names it with its two answers, so a test that fails on the count says which answers it got.
     */
    @Test
    void aLineThatAnswersTwiceAsNew_isCountedAndNamedPresentationByPresentation() throws Exception {
        org.eclipse.paho.client.mqttv3.MqttAsyncClient line = new org.eclipse.paho.client.mqttv3.MqttAsyncClient(broker.url(), "twice-line",
                new org.eclipse.paho.client.mqttv3.persist.MemoryPersistence());
        line.setCallback(new org.eclipse.paho.client.mqttv3.MqttCallback() {
            public void connectionLost(Throwable t) { }

            public void messageArrived(String topic, org.eclipse.paho.client.mqttv3.MqttMessage m) throws Exception {
                var t = net.zbin.io.Json.mapper().readTree(m.getPayload());
                var d = net.zbin.io.Json.object().put("seq", t.path("seq").asLong()).put("part", t.path("part").asText())
                        .put("lot", t.path("lot").asText()).put("bin", 1).put("grade", "J").put("verdict", "pass").put("reason", "in-grade")
                        .put("repeat", false);
                byte[] b = net.zbin.io.Json.mapper().writeValueAsBytes(d);
                line.publish("zbin/twice/decision", b, 1, false);
                line.publish("zbin/twice/decision", b, 1, false); // the same presentation again, not marked as a repeat
            }

            public void deliveryComplete(org.eclipse.paho.client.mqttv3.IMqttDeliveryToken t) { }
        });
        // a loaded Moquette may drop a connection that subscribes the moment it is accepted: dial again, as Tap does
        org.eclipse.paho.client.mqttv3.MqttConnectOptions co = new org.eclipse.paho.client.mqttv3.MqttConnectOptions();
        co.setCleanSession(true);
        net.zbin.sim.BrokerDial.connectAndSubscribe(line, co, new String[] {"zbin/twice/trigger"}, new int[] {1}, 10_000);
        line.publish("zbin/twice/state", "{\"online\": true, \"mode\": \"ready\"}".getBytes(StandardCharsets.UTF_8), 1, true).waitForCompletion(10_000);
        int parts = 6;
        HandlerSim.Options o = new HandlerSim.Options(broker.url(), "zbin", "twice", parts, 100, 150, 5000, 0, 0, 3, "h-twice",
                NoDelaySockets.plain(), null, null, 30_000);
        try (HandlerSim h = new HandlerSim(o, LineRig.quietMeter(Scenario.builtIn()), PartLoader.direct(new net.zbin.sim.Contacts()))) {
            HandlerSim.Summary s = h.run(p -> { });
            assertEquals(0, s.missing());
            assertEquals(parts, s.finished());
            // each part's second copy follows its first on the same connection; the last one's may come after the summary
            assertTrue(s.duplicate() >= parts - 1 && s.duplicate() <= parts, "duplicates counted: " + s.duplicate());
            assertEquals(s.duplicate(), s.duplicateAnswers().size(), "each one named: " + s.duplicateAnswers());
            for (String d : s.duplicateAnswers())
                assertTrue(d.matches("\\d+/\\S+ \\(sent once\\): first pass/in-grade, then pass/in-grade"), d);
        } finally {
            line.publish("zbin/twice/state", new byte[0], 1, true).waitForCompletion(10_000);
            line.disconnect().waitForCompletion(10_000);
            line.close();
        }
    }
}
