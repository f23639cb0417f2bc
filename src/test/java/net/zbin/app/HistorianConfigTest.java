package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** A historian config that cannot be loaded stops {@code zbin historian} with exit 2, naming the file and key. */
class HistorianConfigTest {
    @TempDir
    Path dir;

    Cli historian(String yaml) throws Exception {
        Path f = dir.resolve("h.yaml");
        Files.writeString(f, yaml);
        return Cli.run("historian", "--config", f.toString());
    }

    @Test
    void mistakes_exit2_namingTheKey() throws Exception {
        String db = "database: {url: 'jdbc:postgresql://127.0.0.1:1/zbin', user: zbin_ingest}\n";
        String line = "lines:\n  - {line: l1, records: r}\n";
        String[][] cases = {
                {"lines:\n  - {line: l1, records: r}\n", "database"},
                {"database: {url: 'mysql://x/zbin', user: u}\n" + line, "database.url"},
                {"database: {url: 'jdbc:postgresql://h/z'}\n" + line, "database.user"},
                {db + "lines: []\n", "lines"},
                {db + "lines:\n  - {line: 'a b', records: r}\n", "lines[0].line"},
                {db + "lines:\n  - {line: l1}\n", "lines[0].records"},
                {db + "lines:\n  - {line: l1, records: r}\n  - {line: l1, records: s}\n", "lines"},
                {db + line + "batch_rows: 0\n", "batch_rows"},
                {db + line + "retention_days: -1\n", "retention_days"},
                {db + line + "colour: teal\n", "colour"},
                {"database: {url: 'jdbc:postgresql://h/z', user: u, password_env: ZBIN_NO_SUCH_VARIABLE_17}\n" + line, "database.password_env"},
                {"database: {url: 'jdbc:postgresql://h/z', user: u, password_file: none.pass}\n" + line, "database.password_file"}};
        for (String[] c : cases) {
            Cli r = historian(c[0]);
            assertEquals(2, r.exit(), c[1] + ": " + r.out() + r.err());
            assertTrue(r.err().contains(c[1]), "names " + c[1] + ": " + r.err());
        }
    }

    @Test
    void databaseOptionMistakes_ofReplayTuneAndReport_exit2() throws Exception {
        String recipe = "config/recipes/mlcc-x7r-100n.yaml", db = "jdbc:postgresql://127.0.0.1:1/zbin";
        String[][] cases = {
                {"replay", "--recipe", recipe}, {"replay", "--recipe", recipe, "--in", "x.csv", "--db", db, "--line", "l", "--lot", "a"},
                {"replay", "--recipe", recipe, "--db", db, "--lot", "a"}, {"replay", "--recipe", recipe, "--db", db, "--line", "l"},
                {"replay", "--recipe", recipe, "--db", "postgres://x", "--line", "l", "--lot", "a"},
                {"replay", "--recipe", recipe, "--in", "x.csv", "--lot", "a"},
                {"tune", "--recipe", recipe, "--db", db, "--line", "l", "--from", "yesterday", "--vary", "guard=0:0.4:0.2"},
                {"report", "--recipe", recipe, "--out", dir.resolve("r.html").toString()},
                {"report", "--recipe", recipe, "--out", dir.resolve("r.html").toString(), "--db", db, "--line", "l"}};
        String[] said = {"--in", "not both", "--line", "--lot", "jdbc:postgresql", "go with --db", "--from", "--db", "--lot"};
        for (int i = 0; i < cases.length; i++) {
            Cli r = Cli.run(cases[i]);
            assertEquals(2, r.exit(), String.join(" ", cases[i]) + ": " + r.out() + r.err());
            assertTrue(r.err().contains(said[i]), String.join(" ", cases[i]) + " says " + said[i] + ": " + r.err());
        }
        Cli unreachable = Cli.run("replay", "--recipe", recipe, "--db", db, "--line", "l", "--lot", "a");
        assertEquals(2, unreachable.exit(), unreachable.err());
        assertTrue(unreachable.err().contains("database") && !unreachable.err().contains("\tat "), "a short reason: " + unreachable.err());
    }

    @Test
    void aPasswordFileOthersCanRead_isRefusedLikeTheLineConfigsOwn() throws Exception {
        Path pass = dir.resolve("open.pass");
        Files.writeString(pass, "s3cret-pass-word\n");
        Files.setPosixFilePermissions(pass, java.nio.file.attribute.PosixFilePermissions.fromString("rw-r--r--"));
        Cli r = historian("database: {url: 'jdbc:postgresql://h/z', user: u, password_file: open.pass}\nlines:\n  - {line: l1, records: r}\n");
        assertEquals(2, r.exit(), r.out() + r.err());
        assertTrue(r.err().contains("database.password_file") && r.err().contains("chmod 600") && r.err().contains("database.allow_open_secrets"), r.err());
        assertFalse(r.err().contains("s3cret"), r.err());
    }

    @Test
    void aPasswordIsNeverShown() throws Exception {
        Files.writeString(dir.resolve("db.pass"), "s3cret-pass-word\n");
        Files.setPosixFilePermissions(dir.resolve("db.pass"), java.nio.file.attribute.PosixFilePermissions.fromString("rw-------"));
        var cfg = net.zbin.io.db.HistorianConfig.load(write("database: {url: 'jdbc:postgresql://h/z', user: u, password_file: db.pass}\n"
                + "lines:\n  - {line: l1, records: r}\n"));
        assertEquals("s3cret-pass-word", new String(cfg.ingest().password()));
        assertFalse(cfg.toString().contains("s3cret") || cfg.ingest().toString().contains("s3cret"), cfg.toString());
    }

    Path write(String yaml) throws Exception {
        Path f = dir.resolve("h2.yaml");
        Files.writeString(f, yaml);
        return f;
    }
}
