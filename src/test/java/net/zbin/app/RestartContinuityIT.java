package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.util.List;
import java.util.concurrent.TimeUnit;
import net.zbin.sim.Contacts;
import net.zbin.sim.PartModel;
import net.zbin.sim.SimMeter;
import net.zbin.sim.SimTcpServer;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The real {@code zbin run} killed -9 and started again after longer than the repeat window: what the handler was
 * told is still answered as a repeat, and every counter, the lot command and reset-counters continue.
 */
class RestartContinuityIT {
    @TempDir
    Path dir;

    Process start(Path cfg, String log) throws Exception {
        return new ProcessBuilder("java", "-jar", Jar.path(), "run", "--config", cfg.toString())
                .redirectErrorStream(true).redirectOutput(dir.resolve(log).toFile()).start();
    }

    static JsonNode lastDashboard(Tap tap, java.util.function.Predicate<JsonNode> when) throws InterruptedException {
        return tap.await(m -> m.topic().endsWith("/dashboard") && when.test(m.json()), 1, 20_000).get(0).json();
    }

    /**
     * The answers the handler got marked {@code repeat: true}: the dashboard counts exactly these. Besides the test's
     * deliberate repeats there may be one on a loaded machine: a part answered {@code stale-trigger} and presented again
     * at once, close behind a long run of the line, cannot be told from a copy sent before that answer went out (it may
     * have waited unseen behind the run, or come within 50 ms of the answer), so it gets that not-measured answer again
     * rather than a second, measured one.
     */
    static long repeatsHeard(Tap tap) {
        return tap.on("/decision").stream().filter(m -> m.json().path("repeat").asBoolean()).count();
    }

    /** Starts the daemon and waits for it to say ready; returns the milliseconds that took (printed for the record). */
    long startAndAwaitReady(Tap tap, Path cfg, String log, Process[] slot) throws Exception {
        int mark = tap.msgs.size();
        long t0 = System.nanoTime();
        slot[0] = start(cfg, log);
        tap.awaitFrom(mark, m -> m.topic().endsWith("/state") && m.json().path("mode").asText().equals("ready"), 1, 60_000);
        long ms = (System.nanoTime() - t0) / 1_000_000;
        System.out.printf("restart: process start to ready in %d ms (%s)%n", ms, log);
        return ms;
    }

    @Test
    void afterAKillAndARestartLongerThanTheWindow_repeatsAreRepeats_andCountersLotAndResetContinue() throws Exception {
        SimMeter meter = new SimMeter(new Contacts(), net.zbin.sim.Fixture.IDEAL, Clock.systemUTC(), 9, 0, SimMeter.RandomFaults.NONE);
        meter.contacts().load(new PartModel.Capacitor(100e-9, 0.02, 0, 0.01), 0);
        Process[] daemon = new Process[1];
        try (MosquittoProcess broker = new MosquittoProcess(dir, "");
             SimTcpServer sim = new SimTcpServer(meter, 0);
             Tap tap = new Tap(broker.url(), "zbin/cont/#")) {
            Path cfg = TestLine.write(dir, "cont", broker.url(), sim.port(), "dashboard: {interval_s: 0.5}\n"); // repeat window: default 5 s
            startAndAwaitReady(tap, cfg, "d0.log", daemon);
            for (long s = 1; s <= 100; s++) tap.present("cont", s);
            tap.publish("zbin/cont/command", "{\"cmd\":\"lot\",\"lot\":\"LOT-A\",\"id\":\"a\"}");
            tap.await(m -> m.topic().endsWith("/command/result") && m.json().path("id").asText().equals("a"), 1, 10_000);
            for (long s = 101; s <= 200; s++) tap.present("cont", s);
            for (long s = 196; s <= 200; s++) assertTrue(tap.present("cont", s).path("repeat").asBoolean(), "a deliberate repeat"); // 5 repeats
            for (int i = 0; i < 5; i++) tap.publish("zbin/cont/trigger", "{\"seq\": \"bad\"}");
            tap.publish("zbin/cont/command", "{\"cmd\":\"reset-counters\",\"id\":\"z\"}");
            tap.await(m -> m.topic().endsWith("/command/result") && m.json().path("id").asText().equals("z"), 1, 10_000);
            java.util.Map<Long, JsonNode> told = new java.util.HashMap<>();
            for (long s = 201; s <= 230; s++) told.put(s, tap.present("cont", s));
            long heard = repeatsHeard(tap);
            for (Tap.Msg m : tap.on("/decision")) {
                long s = m.json().path("seq").asLong();
                if (m.json().path("repeat").asBoolean() && (s < 196 || s > 200))
                    assertEquals("stale-trigger", m.json().path("reason").asText(), "only a not-measured answer is repeated to a re-presentation: " + m.json());
            }
            lastDashboard(tap, j -> j.path("parts").asLong() == 30 && j.path("repeats").asLong() == heard && j.path("messages_rejected").asLong() == 5);

            daemon[0].destroyForcibly().waitFor(10, TimeUnit.SECONDS); // kill -9
            Thread.sleep(7000); // down longer than the 5 s repeat window
            startAndAwaitReady(tap, cfg, "d1.log", daemon);
            int mark = tap.msgs.size();
            for (long s = 221; s <= 230; s++) { // the handler redelivers what it sent last
                JsonNode again = tap.present("cont", s);
                assertTrue(again.path("repeat").asBoolean(), "answered from the book, not measured again: " + again);
                assertEquals(told.get(s).path("bin").asInt(), again.path("bin").asInt());
            }
            long heardAll = repeatsHeard(tap); // the 10 answered from the book again on top
            assertEquals(heard + 10, heardAll);
            JsonNode after = tap.awaitFrom(mark, m -> m.topic().endsWith("/dashboard")
                    && m.json().path("repeats").asLong() == heardAll, 1, 20_000).get(0).json();
            assertEquals("LOT-A", after.path("lot").asText(), "the lot named by command survives");
            assertEquals(30, after.path("parts").asLong(), "reset-counters survives: the lot's figures count from the reset");
            assertEquals(5, after.path("messages_rejected").asLong(), "counters of answers without a row continue");
            assertTrue(after.path("uph_hour").asDouble() <= 230, "parts of the last hour, not an extrapolation: " + after.path("uph_hour"));

            tap.publish("zbin/cont/command", "{\"cmd\":\"lot\",\"lot\":\"LOT-NEW\",\"id\":\"n\"}");
            tap.await(m -> m.topic().endsWith("/command/result") && m.json().path("id").asText().equals("n"), 1, 10_000);
            daemon[0].destroyForcibly().waitFor(10, TimeUnit.SECONDS);
            int mark2 = tap.msgs.size();
            startAndAwaitReady(tap, cfg, "d2.log", daemon);
            JsonNode fresh = tap.awaitFrom(mark2, m -> m.topic().endsWith("/dashboard"), 1, 20_000).get(0).json();
            assertEquals("LOT-NEW", fresh.path("lot").asText(), "a lot command after the last row survives a kill -9");
            assertEquals(0, fresh.path("parts").asLong());
        } finally {
            if (daemon[0] != null) {
                daemon[0].destroy();
                daemon[0].waitFor(20, TimeUnit.SECONDS);
            }
        }
        assertTrue(Files.exists(dir.resolve("state-cont/line-cont.json")));
    }
}
