package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
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

/** The real {@code zbin run} process: one daemon per line, and a message too large to hold ends it rather than deafens it. */
class OneLineOneDaemonIT {
    @TempDir
    Path dir;

    Process start(Path cfg, String log, String... jvm) throws Exception {
        List<String> cmd = new java.util.ArrayList<>(List.of("java"));
        cmd.addAll(List.of(jvm));
        cmd.addAll(List.of("-jar", Jar.path(), "run", "--config", cfg.toString()));
        return new ProcessBuilder(cmd).redirectErrorStream(true).redirectOutput(dir.resolve(log).toFile()).start();
    }

    static SimMeter meter() {
        SimMeter m = new SimMeter(new Contacts(), net.zbin.sim.Fixture.IDEAL, Clock.systemUTC(), 9, 0, SimMeter.RandomFaults.NONE);
        m.contacts().load(new PartModel.Capacitor(100e-9, 0.02, 0, 0.01), 0);
        return m;
    }

    @Test
    void aSecondDaemonForTheSameLine_refusesToStart_namingTheHolder_andTheFirstServesOn() throws Exception {
        try (MosquittoProcess broker = new MosquittoProcess(dir, "");
             SimTcpServer sim = new SimTcpServer(meter(), 0);
             Tap tap = new Tap(broker.url(), "zbin/twice/#")) {
            Path cfg = TestLine.write(dir, "twice", broker.url(), sim.port(), "");
            Process first = start(cfg, "first.log");
            try {
                tap.await(m -> m.topic().endsWith("/state") && m.json().path("mode").asText().equals("ready"), 1, 30_000);
                Process second = start(cfg, "second.log");
                assertTrue(second.waitFor(60, TimeUnit.SECONDS), "the second daemon stops by itself");
                assertEquals(1, second.exitValue());
                String said = Files.readString(dir.resolve("second.log"));
                assertTrue(said.contains("line 'twice' is already served by process " + first.pid()), said);
                for (int seq = 1; seq <= 50; seq++) tap.publish("zbin/twice/trigger", "{\"seq\":" + seq + "}");
                tap.await(m -> m.topic().endsWith("/decision"), 50, 30_000);
                assertEquals(50, tap.on("/decision").size(), "one answer per trigger: only one daemon measures");
                assertTrue(first.isAlive());
                assertEquals("ready", tap.on("/state").get(tap.on("/state").size() - 1).json().path("mode").asText(),
                        "the refused start changed nothing on the line");
            } finally {
                first.destroy();
                first.waitFor(20, TimeUnit.SECONDS);
            }
            Process again = start(cfg, "again.log"); // the lock went with the process
            try {
                int seen = tap.msgs.size();
                tap.awaitFrom(seen, m -> m.topic().endsWith("/state") && m.json().path("mode").asText().equals("ready"),
                        1, 30_000);
            } finally {
                again.destroy();
                again.waitFor(20, TimeUnit.SECONDS);
            }
        }
    }

    @Test
    void aMessageTooLargeToHold_endsTheProcess_theWillSaysOffline_andTheShippedBrokerLimitKeepsItOut() throws Exception {
        byte[] huge = new byte[96 << 20]; // 96 MiB: more than the daemon's 64 MiB heap below
        java.util.Arrays.fill(huge, (byte) 'x');
        try (MosquittoProcess broker = new MosquittoProcess(dir, ""); // no size limit: the message reaches zbin
             SimTcpServer sim = new SimTcpServer(meter(), 0);
             Tap tap = new Tap(broker.url(), "zbin/huge/state")) {
            Path cfg = TestLine.write(dir, "huge", broker.url(), sim.port(), "");
            Process d = start(cfg, "huge.log", "-Xmx64m");
            tap.await(m -> m.json().path("mode").asText().equals("ready"), 1, 30_000);
            int seen = tap.msgs.size();
            tap.publish("zbin/huge/trigger", huge);
            assertTrue(d.waitFor(60, TimeUnit.SECONDS), "the daemon does not live on deaf");
            assertEquals(1, d.exitValue());
            assertTrue(Files.readString(dir.resolve("huge.log")).contains("fatal error in thread"), Files.readString(dir.resolve("huge.log")));
            JsonNode will = tap.awaitFrom(seen, m -> !m.json().path("online").asBoolean(true), 1, 30_000).get(0).json();
            assertEquals("offline", will.path("mode").asText());
        }
        String limit = Files.readAllLines(Path.of("config/mosquitto/zbin.conf")).stream().filter(l -> l.startsWith("message_size_limit"))
                .findFirst().orElseThrow();
        try (MosquittoProcess broker = new MosquittoProcess(dir, limit + "\n"); // the shipped limit
             SimTcpServer sim = new SimTcpServer(meter(), 0);
             Tap tap = new Tap(broker.url(), "zbin/huge2/#")) {
            Path cfg = TestLine.write(dir, "huge2", broker.url(), sim.port(), "");
            Process d = start(cfg, "huge2.log", "-Xmx64m");
            try {
                tap.await(m -> m.topic().endsWith("/state") && m.json().path("mode").asText().equals("ready"), 1, 30_000);
                tap.publish("zbin/huge2/trigger", huge);
                tap.publish("zbin/huge2/trigger", "{\"seq\":7}");
                JsonNode after = tap.await(m -> m.topic().endsWith("/decision"), 1, 30_000).get(0).json();
                assertEquals(7, after.path("seq").asLong(), "the line answers on; the huge message never reached it");
                assertTrue(d.isAlive());
                assertFalse(tap.msgs.stream().anyMatch(m -> m.raw().length() > 65536), "the broker forwarded nothing over its limit");
            } finally {
                d.destroy();
                d.waitFor(20, TimeUnit.SECONDS);
            }
        }
    }
}
