package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.attribute.PosixFilePermissions;
import java.util.List;
import java.util.concurrent.TimeUnit;
import net.zbin.sim.PartModel;
import net.zbin.sim.Scenario;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The daemon over ssl:// to a Mosquitto TLS listener, with a CA and certificates made here by
 * openssl; and a config naming a CA that does not match is refused at connect, not ignored.
 */
class BrokerTlsIT {
    @TempDir
    Path dir;

    void openssl(String... args) throws Exception {
        List<String> cmd = new java.util.ArrayList<>(List.of("openssl"));
        cmd.addAll(List.of(args));
        Process p = new ProcessBuilder(cmd).directory(dir.toFile()).redirectErrorStream(true).start();
        String out = new String(p.getInputStream().readAllBytes());
        assertTrue(p.waitFor(30, TimeUnit.SECONDS));
        assertEquals(0, p.exitValue(), String.join(" ", cmd) + ": " + out);
    }

    @Test
    void daemonOverTls_answersTriggers_andAWrongCaIsRefused() throws Exception {
        openssl("req", "-x509", "-newkey", "rsa:2048", "-nodes", "-days", "2", "-subj", "/CN=zbin test CA", "-keyout", "ca.key", "-out", "ca.pem");
        openssl("req", "-newkey", "rsa:2048", "-nodes", "-subj", "/CN=127.0.0.1", "-keyout", "server.key", "-out", "server.csr");
        Files.writeString(dir.resolve("san.ext"), "subjectAltName=IP:127.0.0.1\n");
        openssl("x509", "-req", "-in", "server.csr", "-CA", "ca.pem", "-CAkey", "ca.key", "-CAcreateserial", "-days", "2",
                "-extfile", "san.ext", "-out", "server.pem");
        openssl("req", "-x509", "-newkey", "rsa:2048", "-nodes", "-days", "2", "-subj", "/CN=some other CA", "-keyout", "other.key", "-out", "other.pem");
        Files.setPosixFilePermissions(dir, PosixFilePermissions.fromString("rwxr-xr-x"));
        for (String f : new String[] {"ca.pem", "server.pem", "server.key"})
            Files.setPosixFilePermissions(dir.resolve(f), PosixFilePermissions.fromString("rw-r--r--"));
        int tlsPort = MosquittoProcess.freePort();
        String tls = "listener " + tlsPort + " 127.0.0.1\ncafile " + dir.resolve("ca.pem") + "\ncertfile " + dir.resolve("server.pem")
                + "\nkeyfile " + dir.resolve("server.key") + "\n";
        try (MosquittoProcess broker = new MosquittoProcess(dir, tls)) {
            String url = "ssl://127.0.0.1:" + tlsPort;
            try (LineRig rig = new LineRig(dir, "tls", url, LineRig.quietMeter(Scenario.builtIn()), "mlcc-x7r-100n", "", "topic_root: zbin, tls: {ca_file: ca.pem}}");
                 Tap tap = new Tap(broker.url(), "zbin/tls/decision")) {
                rig.contacts.load(new PartModel.Capacitor(100e-9, 0.02, 0, 0.01), 0);
                tap.publish("zbin/tls/trigger", "{\"seq\": 1}");
                assertEquals("J", tap.await(m -> true, 1, 10_000).get(0).json().path("grade").asText());
            }
            Path cfg = TestLine.write(dir.resolve("wrong"), "tls2", url, 5025, "");
            Files.copy(dir.resolve("other.pem"), dir.resolve("wrong/other.pem"));
            Files.writeString(cfg, Files.readString(cfg).replace("topic_root: zbin}", "topic_root: zbin, tls: {ca_file: other.pem}}"));
            Cli check = Cli.run("check", "--config", cfg.toString());
            assertEquals(0, check.exit(), "the file itself is valid: " + check.err());
            Process run = new ProcessBuilder("java", "-jar", Jar.path(), "run", "--config", cfg.toString(), "--connect-timeout", "5000")
                    .redirectErrorStream(true).start();
            String out = new String(run.getInputStream().readAllBytes());
            assertTrue(run.waitFor(60, TimeUnit.SECONDS));
            assertEquals(1, run.exitValue(), out);
            assertTrue(out.contains("cannot connect to " + url), out);
            assertTrue(out.toLowerCase(java.util.Locale.ROOT).contains("certif"), "the refusal says why (the certificate check): " + out);
        }
    }
}
