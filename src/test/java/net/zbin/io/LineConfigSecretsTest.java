package net.zbin.io;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import net.zbin.app.TestLine;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

class LineConfigSecretsTest {
    @TempDir
    Path dir;

    @Test
    void passwordFromFile_isLoadedButNeverShownInText() throws Exception {
        Path cfg = TestLine.write(dir, "sec", "tcp://127.0.0.1:1883", 5025, "");
        Files.writeString(dir.resolve("mqtt.pass"), "s3cret-Harrowgate\n");
        Files.setPosixFilePermissions(dir.resolve("mqtt.pass"), java.nio.file.attribute.PosixFilePermissions.fromString("rw-------"));
        TestLine.mqttKeys(cfg, "username: zbin-daemon, password_file: mqtt.pass");
        LineConfig c = LineConfigLoader.load(cfg);
        assertArrayEquals("s3cret-Harrowgate".toCharArray(), c.mqtt().password());
        assertFalse(c.mqtt().toString().contains("s3cret"), c.mqtt().toString());
        assertFalse(c.toString().contains("s3cret"));
        var out = net.zbin.app.Cli.run("check", "--config", cfg.toString());
        assertFalse((out.out() + out.err()).contains("s3cret"));
        assertTrue(out.out().contains("user zbin-daemon, password set"), out.out());
    }

    @Test
    void aPasswordFileOthersCanRead_isRefusedNamingKeyAndMode_unlessAllowedWithAWarning() throws Exception {
        Path cfg = TestLine.write(dir, "sec", "tcp://127.0.0.1:1883", 5025, "");
        Files.writeString(dir.resolve("mqtt.pass"), "s3cret-Harrowgate\n");
        Files.setPosixFilePermissions(dir.resolve("mqtt.pass"), java.nio.file.attribute.PosixFilePermissions.fromString("rw-r--r--"));
        TestLine.mqttKeys(cfg, "username: zbin-daemon, password_file: mqtt.pass");
        var out = net.zbin.app.Cli.run("check", "--config", cfg.toString());
        assertEquals(2, out.exit());
        assertTrue(out.err().contains("mqtt.password_file") && out.err().contains("rw-r--r--") && out.err().contains("chmod 600"), out.err());
        Files.writeString(cfg, Files.readString(cfg).replace("password_file: mqtt.pass", "password_file: mqtt.pass, allow_open_secrets: true"));
        assertArrayEquals("s3cret-Harrowgate".toCharArray(), LineConfigLoader.load(cfg).mqtt().password());
    }
}
