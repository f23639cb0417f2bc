package net.zbin.app;

import java.io.IOException;
import java.io.PrintWriter;
import java.nio.file.Files;
import java.nio.file.Path;
import picocli.CommandLine.Option;

/**
 * What {@code replay} and {@code tune} share about reading a lot: the line whose engine decides it, the HTML report
 * and the progress line.
 */
final class ReadOptions {
    @Option(names = "--line-config", paramLabel = "LINE.yaml",
            description = "decide as this line does: its fixture-check limits and monitor settings (default: the recipe's own, default check limits)")
    Path lineConfig;
    @Option(names = "--report", paramLabel = "FILE.html", description = "also write a self-contained HTML report with plots")
    Path report;
    @Option(names = "--quiet", description = "no progress on stderr")
    boolean quiet;
    @Option(names = "--progress", description = "progress on stderr even when it is not a terminal")
    boolean progress;

    private net.zbin.io.LineConfig line;

    @Option(names = "--db", paramLabel = "JDBC_URL", description = "read the lot from the historian's database instead of --in, e.g. jdbc:postgresql://host/zbin")
    String db;
    @Option(names = "--db-user", paramLabel = "ROLE", description = "database role (default: the operating-system user)")
    String dbUser;
    @Option(names = "--db-password-env", paramLabel = "VAR", description = "environment variable holding the role's password")
    String dbPasswordEnv;
    @Option(names = "--line", paramLabel = "ID", description = "with --db: the line")
    String dbLine;
    @Option(names = "--lot", paramLabel = "LOT", description = "with --db: the lot")
    String dbLot;
    @Option(names = "--from", paramLabel = "INSTANT", description = "with --db: decisions from this time, e.g. 2026-12-01T06:00:00Z")
    String from;
    @Option(names = "--to", paramLabel = "INSTANT", description = "with --db: decisions before this time")
    String to;

    /** The rows to replay: the file of {@code --in}, or the line's decisions in the database. */
    net.zbin.io.ReadingSource open(Path in, java.util.function.Consumer<net.zbin.io.ReadingSource.BadRow> bad)
            throws UsageException, IOException, net.zbin.io.ConfigException {
        if (db == null) {
            if (dbLine != null || dbLot != null || from != null || to != null) throw new UsageException("--line, --lot, --from and --to go with --db");
            if (in == null) throw new UsageException("give --in FILE.csv, or --db URL --line ID with --lot LOT or --from/--to");
            return net.zbin.io.ReadingSource.open(in, bad);
        }
        if (in != null) throw new UsageException("give --in or --db, not both");
        checkDb();
        return new net.zbin.io.db.DbReadingSource(login(), dbLine, dbLot, instant("--from", from), instant("--to", to), bad);
    }

    /** The database options make one selection: a URL, a line, and a lot or a time range (valid instants). */
    void checkDb() throws UsageException {
        if (db == null) throw new UsageException("give --db URL --line ID with --lot LOT or --from/--to");
        if (!db.startsWith("jdbc:postgresql://")) throw new UsageException("--db must be a jdbc:postgresql:// URL (was '" + db + "')");
        if (dbLine == null) throw new UsageException("--db needs --line ID");
        if (dbLot == null && from == null && to == null) throw new UsageException("--db needs --lot LOT, or a time range with --from/--to");
        instant("--from", from);
        instant("--to", to);
    }

    /** The database role of {@code --db-user} (default: the operating-system user) with its password from the environment. */
    net.zbin.io.db.Db.Login login() throws UsageException {
        char[] pw = null;
        if (dbPasswordEnv != null) {
            String v = System.getenv(dbPasswordEnv);
            if (v == null) throw new UsageException("--db-password-env: environment variable " + dbPasswordEnv + " is not set");
            pw = v.toCharArray();
        }
        return new net.zbin.io.db.Db.Login(db, dbUser != null ? dbUser : System.getProperty("user.name"), pw);
    }

    java.time.Instant fromInstant() throws UsageException { return instant("--from", from); }

    java.time.Instant toInstant() throws UsageException { return instant("--to", to); }

    private static java.time.Instant instant(String option, String text) throws UsageException {
        if (text == null) return null;
        try {
            return java.time.Instant.parse(text);
        } catch (java.time.format.DateTimeParseException e) {
            throw new UsageException(option + " must be an instant like 2026-12-01T06:00:00Z (was '" + text + "')");
        }
    }

    /** The input as messages name it. */
    String inputName(Path in) {
        return in != null ? in.toString() : "database line " + dbLine + (dbLot == null ? "" : " lot " + dbLot);
    }

    /** The line config of {@code --line-config}, loaded once (null without it). */
    private net.zbin.io.LineConfig line() throws net.zbin.io.ConfigException {
        if (line == null && lineConfig != null) line = net.zbin.io.LineConfigLoader.load(lineConfig);
        return line;
    }

    /** The recipe as the line uses it: on the line's fixture (its open/short bounds) when {@code --line-config} is given. */
    net.zbin.core.Recipe forLine(net.zbin.core.Recipe recipe) throws net.zbin.io.ConfigException {
        return line() == null ? recipe : recipe.withFixture(line().bounds());
    }

    /** The engine the lot is decided by: the line's when {@code --line-config} is given, else the recipe's own. */
    net.zbin.core.LineEngine engine(net.zbin.core.Recipe recipe) throws net.zbin.io.ConfigException {
        return line() == null ? net.zbin.core.LineEngine.of(recipe) : line().engine(recipe);
    }

    /** Refuses an output file whose folder does not exist, naming the option. */
    static void folderOf(String option, Path file) throws UsageException {
        if (file == null) return;
        Path folder = file.toAbsolutePath().getParent();
        if (folder != null && !Files.isDirectory(folder)) throw new UsageException(option + ": folder " + folder + " does not exist");
    }

    /** The progress line for reading {@code in}, or null when the file is not there (the reader then says so). */
    RowProgress progress(PrintWriter err, Path in) throws IOException {
        return in != null && Files.exists(in) ? new RowProgress(err, in, quiet, progress) : null;
    }
}
