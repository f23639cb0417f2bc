package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.attribute.PosixFilePermissions;
import net.zbin.io.ConfigException;
import net.zbin.io.LineConfig;
import net.zbin.io.LineConfigLoader;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The {@code status:} section of a line config: off by default, read-only unless operators are named, and fail closed. */
class StatusConfigTest {
    @TempDir
    Path dir;

    Path config(String status) throws Exception {
        return TestLine.write(dir, "st-line", "tcp://127.0.0.1:1883", 5025, status);
    }

    void operators(String yaml, String mode) throws Exception {
        Path f = dir.resolve("operators.yaml");
        Files.writeString(f, yaml);
        Files.setPosixFilePermissions(f, PosixFilePermissions.fromString(mode));
    }

    ConfigException refused(String status) throws Exception {
        Path cfg = config(status);
        return assertThrows(ConfigException.class, () -> LineConfigLoader.load(cfg));
    }

    @Test
    void noStatusSection_servesNoPage() throws Exception {
        assertNull(LineConfigLoader.load(config("")).status());
    }

    @Test
    void aLoopbackPage_withoutOperators_isReadOnly() throws Exception {
        LineConfig.Status s = LineConfigLoader.load(config("status: {listen: '127.0.0.1:8080'}\n")).status();
        assertEquals("127.0.0.1", s.host());
        assertEquals(8080, s.port());
        assertNull(s.operators());
        assertTrue(s.loopback());
    }

    @Test
    void operators_areReadFromTheirOwnFile_andTheirTokensNeverShow() throws Exception {
        operators("operators:\n  ana.k: 'rV9q2LwX8mT4zN6pA1sD'\n  ben: 'Qw3rTy7uIo0pAs5dFg8h'\n", "rw-------");
        LineConfig.Status s = LineConfigLoader.load(config("status: {listen: '127.0.0.1:0', operators_file: operators.yaml}\n")).status();
        assertEquals("ana.k", s.operators().who("rV9q2LwX8mT4zN6pA1sD"));
        assertEquals("ben", s.operators().who("Qw3rTy7uIo0pAs5dFg8h"));
        assertNull(s.operators().who("rV9q2LwX8mT4zN6pA1sE"));
        assertFalse(s.operators().toString().contains("rV9q"), s.operators().toString());
    }

    @Test
    void theShippedOperatorsExample_loads() throws Exception {
        assertEquals(2, net.zbin.io.Operators.load(Path.of("config/operators.example.yaml")).size());
    }

    @Test
    void mistakes_nameTheKeyAndWhatIsWrong() throws Exception {
        assertTrue(refused("status: {listen: nowhere}\n").getMessage().contains("status.listen"));
        assertTrue(refused("status: {listen: '127.0.0.1:70000'}\n").getMessage().contains("status.listen"));
        assertTrue(refused("status: {listen: '127.0.0.1:0', colour: teal}\n").getMessage().contains("status.colour"));
        assertTrue(refused("status: {listen: '127.0.0.1:0', operators_file: none.yaml}\n").getMessage().contains("status.operators_file"));
        assertTrue(refused("status: {listen: '127.0.0.1:0', tls: {cert_file: none.pem}}\n").getMessage().contains("status.tls.cert_file"));
        operators("operators:\n  ana: 'rV9q2LwX8mT4zN6pA1sD'\n", "rw-r--r--");
        ConfigException open = refused("status: {listen: '127.0.0.1:0', operators_file: operators.yaml}\n");
        assertTrue(open.getMessage().contains("status.operators_file") && open.getMessage().contains("chmod 600"), open.getMessage());
        operators("operators:\n  ana: short\n", "rw-------");
        ConfigException shortToken = refused("status: {listen: '127.0.0.1:0', operators_file: operators.yaml}\n");
        assertTrue(shortToken.getMessage().contains("operators.ana") && shortToken.getMessage().contains("16 characters")
                && !shortToken.getMessage().contains("short"), "names the operator, not the token: " + shortToken.getMessage());
    }

    @Test
    void operatorsOnAPageOthersCanReach_needTls() throws Exception {
        operators("operators:\n  ana: 'rV9q2LwX8mT4zN6pA1sD'\n", "rw-------");
        ConfigException e = refused("status: {listen: '0.0.0.0:8080', operators_file: operators.yaml}\n");
        assertTrue(e.getMessage().contains("status.tls") && e.getMessage().contains("loopback"), e.getMessage());
        // read-only on every address is allowed: nothing can be done from it
        assertNull(LineConfigLoader.load(config("status: {listen: '0.0.0.0:8080'}\n")).status().operators());
    }

    @Test
    void check_exits2_onAStatusMistake() throws Exception {
        Cli c = Cli.run("check", "--config", config("status: {listen: '127.0.0.1'}\n").toString());
        assertEquals(2, c.exit(), c.out() + c.err());
        assertTrue(c.err().contains("status.listen"), c.err());
    }
}
