package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
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

    /** A test CA (ca.pem, ca.key) and a server certificate for 127.0.0.1 signed by it (server.pem, server.key). */
    void caAndServerCertificate() throws Exception {
        openssl("req", "-x509", "-newkey", "rsa:2048", "-nodes", "-days", "2", "-subj", "/CN=zbin test CA", "-keyout", "ca.key", "-out", "ca.pem");
        openssl("req", "-newkey", "rsa:2048", "-nodes", "-subj", "/CN=127.0.0.1", "-keyout", "server.key", "-out", "server.csr");
        Files.writeString(dir.resolve("san.ext"), "subjectAltName=IP:127.0.0.1\n");
        openssl("x509", "-req", "-in", "server.csr", "-CA", "ca.pem", "-CAkey", "ca.key", "-CAcreateserial", "-days", "2",
                "-extfile", "san.ext", "-out", "server.pem");
    }

    @Test
    void daemonOverTls_answersTriggers_andAWrongCaIsRefused() throws Exception {
        caAndServerCertificate();
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
                assertEquals("J", tap.present("tls", 1).path("grade").asText()); // again after a stale-trigger (a loaded machine)
            }
            Path cfg = TestLine.write(dir.resolve("wrong"), "tls2", url, 5025, "");
            Files.copy(dir.resolve("other.pem"), dir.resolve("wrong/other.pem"));
            TestLine.mqttKeys(cfg, "tls: {ca_file: other.pem}");
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

    @Test
    void clientCertificateAndPassword_overTls_withAnAcl_andTheSecretNeverInTheLogAtDebug() throws Exception {
        caAndServerCertificate();
        openssl("req", "-newkey", "rsa:2048", "-nodes", "-subj", "/CN=zbin-tlsc", "-keyout", "client.rsa", "-out", "client.csr");
        openssl("x509", "-req", "-in", "client.csr", "-CA", "ca.pem", "-CAkey", "ca.key", "-CAcreateserial", "-days", "2", "-out", "client.pem");
        openssl("pkcs8", "-topk8", "-nocrypt", "-in", "client.rsa", "-out", "client.key");
        Files.setPosixFilePermissions(dir.resolve("client.key"), PosixFilePermissions.fromString("rw-------")); // zbin refuses a key others can read
        String secret = "s3cret-tlsc-" + System.nanoTime();
        Path pw = dir.resolve("passwd");
        for (String[] u : new String[][] {{"zbin-tlsc", secret}, {"tester", "tester-pw"}}) {
            List<String> cmd = new java.util.ArrayList<>(List.of("mosquitto_passwd", "-b"));
            if (!Files.exists(pw)) cmd.add("-c");
            cmd.addAll(List.of(pw.toString(), u[0], u[1]));
            Process p = new ProcessBuilder(cmd).redirectErrorStream(true).start();
            assertTrue(p.waitFor(10, TimeUnit.SECONDS));
        }
        Files.writeString(dir.resolve("acl"), "user zbin-tlsc\ntopic readwrite zbin/tlsc/#\n\nuser tester\ntopic readwrite zbin/#\n");
        Files.setPosixFilePermissions(dir, PosixFilePermissions.fromString("rwxr-xr-x"));
        for (String f : new String[] {"ca.pem", "server.pem", "server.key", "passwd", "acl"})
            Files.setPosixFilePermissions(dir.resolve(f), PosixFilePermissions.fromString("rw-r--r--"));
        int tlsPort = MosquittoProcess.freePort();
        String conf = "allow_anonymous false\npassword_file " + pw + "\nacl_file " + dir.resolve("acl") + "\n"
                + "listener " + tlsPort + " 127.0.0.1\ncafile " + dir.resolve("ca.pem") + "\ncertfile " + dir.resolve("server.pem")
                + "\nkeyfile " + dir.resolve("server.key") + "\nrequire_certificate true\n";
        net.zbin.sim.SimMeter meter = new net.zbin.sim.SimMeter(new net.zbin.sim.Contacts(), net.zbin.sim.Fixture.IDEAL, java.time.Clock.systemUTC(),
                3, 0, net.zbin.sim.SimMeter.RandomFaults.NONE);
        meter.contacts().load(new PartModel.Capacitor(100e-9, 0.02, 0, 0.01), 0);
        try (MosquittoProcess broker = new MosquittoProcess(dir, conf); net.zbin.sim.SimTcpServer sim = new net.zbin.sim.SimTcpServer(meter, 0)) {
            String url = "ssl://127.0.0.1:" + tlsPort;
            Path cfg = TestLine.write(dir, "tlsc", url, sim.port(), "");
            Files.writeString(dir.resolve("daemon.pass"), secret + "\n");
            Files.setPosixFilePermissions(dir.resolve("daemon.pass"), java.nio.file.attribute.PosixFilePermissions.fromString("rw-------"));
            TestLine.mqttKeys(cfg, "username: zbin-tlsc, password_file: daemon.pass, tls: {ca_file: ca.pem, cert_file: client.pem, key_file: client.key}");
            ProcessBuilder pb = new ProcessBuilder("java", "-jar", Jar.path(), "run", "--config", cfg.toString()).redirectErrorStream(true)
                    .redirectOutput(dir.resolve("daemon.log").toFile());
            pb.environment().put("ZBIN_LOG_LEVEL", "DEBUG");
            Process daemon = pb.start();
            try (Tap tap = Tap.login(broker.url(), "tester", "tester-pw", "zbin/tlsc/decision", "zbin/tlsc/state")) {
                tap.await(m -> m.topic().endsWith("/state") && m.json().path("online").asBoolean(), 1, 30_000);
                assertEquals("J", tap.present("tlsc", 1).path("grade").asText()); // again after a stale-trigger (a loaded machine)
            } finally {
                daemon.destroy();
                assertTrue(daemon.waitFor(30, TimeUnit.SECONDS));
            }
            String log = Files.readString(dir.resolve("daemon.log"));
            assertTrue(log.contains("DEBUG") || log.contains("INFO"), "the daemon logged at DEBUG: " + log.length() + " chars");
            assertFalse(log.contains(secret), "the password never reaches the log");

            // Fail closed: each TLS file named but unloadable stops the start, naming its key.
            for (String key : new String[] {"ca_file", "cert_file", "key_file"}) {
                Path bad = dir.resolve("bad-" + key + ".pem");
                Files.writeString(bad, "-----BEGIN CERTIFICATE-----\nnot base64 !!\n-----END CERTIFICATE-----\n");
                String file = switch (key) { case "ca_file" -> "ca.pem"; case "cert_file" -> "client.pem"; default -> "client.key"; };
                Path badCfg = dir.resolve("bad-" + key + ".yaml");
                Files.writeString(badCfg, Files.readString(cfg).replace(key + ": " + file, key + ": " + bad.getFileName()));
                Cli check = Cli.run("check", "--config", badCfg.toString());
                assertEquals(2, check.exit(), key + ": " + check.out() + check.err());
                assertTrue(check.err().contains("mqtt.tls." + key), check.err());
                Cli run = Cli.run("run", "--config", badCfg.toString());
                assertEquals(2, run.exit(), key + ": " + run.err());
            }
        }
    }
}
