package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.concurrent.TimeUnit;
import net.zbin.sim.PartModel;
import net.zbin.sim.Scenario;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The shipped Mosquitto config and ACL, run in a real Mosquitto (paths and port rewritten to the
 * test's), with the real daemon logging in as zbin-acl: each role can do what it should, no more, and a handler only on its own line.
 */
class BrokerAclIT {
    @TempDir
    Path dir;

    @Test
    void shippedAcl_handlerTriggers_operatorReads_engineerCommands() throws Exception {
        Path pw = dir.resolve("zbin.passwd");
        boolean first = true;
        for (String u : new String[] {"zbin-acl", "handler-acl", "handler-other", "operator", "engineer"}) {
            ProcessBuilder pb = first ? new ProcessBuilder("mosquitto_passwd", "-c", "-b", pw.toString(), u, u + "-secret")
                    : new ProcessBuilder("mosquitto_passwd", "-b", pw.toString(), u, u + "-secret");
            Process p = pb.redirectErrorStream(true).start();
            assertTrue(p.waitFor(10, TimeUnit.SECONDS));
            assertEquals(0, p.exitValue(), "mosquitto_passwd for " + u + ": " + new String(p.getInputStream().readAllBytes()));
            first = false;
        }
        // The shipped ACL with its example line renamed to the test's line, plus the same blocks for a second line.
        String acl = Files.readString(Path.of("config/mosquitto/zbin.acl"));
        Files.writeString(dir.resolve("zbin.acl"), acl.replace("hg-line-2", "acl") + "\n"
                + acl.substring(acl.indexOf("user zbin-hg-line-2"), acl.indexOf("# The line operator")).replace("hg-line-2", "other"));
        StringBuilder conf = new StringBuilder();
        for (String l : Files.readAllLines(Path.of("config/mosquitto/zbin.conf"))) {
            if (l.startsWith("listener ")) continue; // the test's own listener on a free port
            if (l.startsWith("password_file ")) l = "password_file " + pw;
            if (l.startsWith("acl_file ")) l = "acl_file " + dir.resolve("zbin.acl");
            if (l.startsWith("persistence_location ")) l = "persistence_location " + dir + "/";
            conf.append(l).append('\n');
        }
        // Mosquitto started as root drops to its own user: let it read the test's files.
        Files.setPosixFilePermissions(dir, java.nio.file.attribute.PosixFilePermissions.fromString("rwxr-xr-x"));
        for (Path f : new Path[] {pw, dir.resolve("zbin.acl")})
            Files.setPosixFilePermissions(f, java.nio.file.attribute.PosixFilePermissions.fromString("rw-r--r--"));
        try (MosquittoProcess broker = new MosquittoProcess(dir, conf.toString())) {
            Files.writeString(dir.resolve("daemon.pass"), "zbin-acl-secret\n");
            Files.setPosixFilePermissions(dir.resolve("daemon.pass"), java.nio.file.attribute.PosixFilePermissions.fromString("rw-------"));
            Scenario sc = LineRig.quietMeter(Scenario.builtIn());
            try (LineRig rig = new LineRigWithLogin(dir, broker.url(), sc);
                 Tap handler = Tap.login(broker.url(), "handler-acl", "handler-acl-secret", "zbin/acl/decision", "zbin/acl/state");
                 Tap otherHandler = Tap.login(broker.url(), "handler-other", "handler-other-secret", "zbin/acl/decision");
                 Tap operator = Tap.login(broker.url(), "operator", "operator-secret", "zbin/acl/#");
                 Tap engineer = Tap.login(broker.url(), "engineer", "engineer-secret", "zbin/acl/#")) {
                rig.contacts.load(new PartModel.Capacitor(100e-9, 0.02, 0, 0.01), 0);
                handler.await(m -> m.topic().endsWith("/state") && m.json().path("online").asBoolean(), 1, 10_000);
                // (presented again after a stale-trigger, as a handler does: a loaded machine can make the first one wait)
                assertEquals("J", handler.present("acl", 1).path("grade").asText());
                operator.await(m -> m.topic().endsWith("/decision"), 1, 10_000);

                // No sleeping to prove that nothing arrived: each refused message is acknowledged by the broker (which
                // has then dropped it), and an allowed message sent after it must come through first — a fence.
                operator.publishAcknowledged("zbin/acl/command", "{\"cmd\":\"pause\",\"id\":\"op\"}");   // denied by the ACL
                handler.publishAcknowledged("zbin/acl/command", "{\"cmd\":\"pause\",\"id\":\"hd\"}");    // denied by the ACL
                engineer.publishAcknowledged("zbin/acl/command", "{\"cmd\":\"lot\",\"lot\":\"HG-ACL\",\"id\":\"en\"}");
                engineer.publishAcknowledged("zbin/acl/command", "{\"cmd\":\"resume\",\"id\":\"fence\"}");
                engineer.await(m -> m.topic().endsWith("/command/result") && m.json().path("id").asText().equals("fence"), 1, 10_000);
                var results = engineer.on("/command/result");
                assertEquals(List.of("en", "fence"), results.stream().map(m -> m.json().path("id").asText()).toList(),
                        "only the engineer's commands reached the daemon: " + results);
                operator.publishAcknowledged("zbin/acl/trigger", "{\"seq\": 2}");                    // operator may not trigger
                otherHandler.publishAcknowledged("zbin/acl/trigger", "{\"seq\": 3}");               // another line's handler may not trigger here
                handler.publishAcknowledged("zbin/acl/trigger", "{\"seq\": 4, \"part\": \"acl-4\"}"); // the fence
                handler.await(m -> m.topic().endsWith("/decision") && m.json().path("seq").asLong() == 4, 1, 10_000);
                assertEquals(List.of(1L, 4L), handler.on("/decision").stream().map(m -> m.json().path("seq").asLong()).distinct().toList(),
                        "no decision for the operator's trigger nor for another line's handler");
                // the one seq presented more than once is the first part, and only after stale-trigger answers
                List<JsonNode> ofOne = handler.on("/decision").stream().filter(m -> m.json().path("seq").asLong() == 1).map(Tap.Msg::json).toList();
                for (JsonNode a : ofOne.subList(0, ofOne.size() - 1)) assertEquals("stale-trigger", a.path("reason").asText(), ofOne.toString());
                assertEquals(1, handler.on("/decision").stream().filter(m -> m.json().path("seq").asLong() == 4).count(), "the fence: one answer");
                assertEquals(0, otherHandler.on("/decision").size(), "another line's handler reads nothing of this line");
            }
        }
    }

    /** A line rig whose daemon logs in as zbin-acl with a password file. */
    static final class LineRigWithLogin extends LineRig {
        LineRigWithLogin(Path dir, String broker, Scenario sc) throws Exception {
            super(dir, "acl", broker, sc, "mlcc-x7r-100n", "", "topic_root: zbin, username: zbin-acl, password_file: daemon.pass}");
        }
    }
}
