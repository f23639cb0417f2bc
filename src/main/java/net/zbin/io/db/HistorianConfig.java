package net.zbin.io.db;

import java.nio.file.Path;
import java.util.List;
import net.zbin.io.ConfigException;
import net.zbin.io.SpecNode;
import net.zbin.io.Yaml;

/**
 * What {@code zbin historian} follows and where it writes: the lines' record and state folders, the database and its
 * two roles (the owner runs migrations, creates day partitions and drops old ones; the ingest role only inserts and
 * reads), batch size, polling and retention. Passwords come from a file or the environment and are never logged.
 *
 * @param metricsListen host:port for the historian's own {@code /metrics}, or null
 */
public record HistorianConfig(Path file, Db.Login ingest, Db.Login owner, List<FollowedLine> lines, int batchRows, int pollMs,
                              int retentionDays, String metricsListen) {
    /** One line's durable record: its record folder and (for the alarm history) its state folder. */
    public record FollowedLine(String line, Path records, Path state) {}

    public static HistorianConfig load(Path file) throws ConfigException { return load(file, true); }

    /** @param secrets false: leave the passwords unread (checking a shipped example whose variables are not set here) */
    public static HistorianConfig load(Path file, boolean secrets) throws ConfigException {
        SpecNode n = Yaml.read(file);
        Path base = file.toAbsolutePath().getParent();
        SpecNode db = n.child("database");
        if (!n.has("database")) throw n.error("database", "is required (url, user and owner_user)");
        String url = db.text("url");
        if (!url.startsWith("jdbc:postgresql://")) throw db.error("url", "must be a jdbc:postgresql:// URL (was '" + url + "')");
        boolean openOk = db.optBool("allow_open_secrets", false);
        Db.Login ingest = new Db.Login(url, db.text("user"), password(db, base, "password_file", "password_env", secrets, openOk));
        Db.Login owner = new Db.Login(url, db.optText("owner_user", ingest.user()),
                password(db, base, "owner_password_file", "owner_password_env", secrets, openOk));
        db.finish();
        List<FollowedLine> lines = n.list("lines", l -> {
            String id = l.text("line");
            if (!id.matches("[A-Za-z0-9][A-Za-z0-9._-]{0,63}")) throw l.error("line", "must be 1..64 letters, digits, '.', '_' or '-' (was '" + id + "')");
            Path rec = base.resolve(l.text("records")).normalize(); // a folder not there yet is waited for (a line not started yet)
            String st = l.optText("state", null);
            FollowedLine f = new FollowedLine(id, rec, st == null ? null : base.resolve(st).normalize());
            l.finish();
            return f;
        });
        if (lines.isEmpty()) throw n.error("lines", "names no line: give at least one {line, records}");
        if (lines.stream().map(FollowedLine::line).distinct().count() != lines.size()) throw n.error("lines", "names a line twice");
        int batch = n.optInteger("batch_rows", 5000);
        if (batch < 1 || batch > 1_000_000) throw n.error("batch_rows", "must be 1..1000000 (was " + batch + ")");
        int poll = n.optInteger("poll_ms", 500);
        if (poll < 10 || poll > 60_000) throw n.error("poll_ms", "must be 10..60000 (was " + poll + ")");
        int keep = n.optInteger("retention_days", 0);
        if (keep < 0) throw n.error("retention_days", "must be >= 0, 0 keeps everything (was " + keep + ")");
        String metrics = n.optText("metrics_listen", null);
        if (metrics != null) {
            try {
                net.zbin.io.HostPort.parse(metrics);
            } catch (IllegalArgumentException e) {
                throw n.error("metrics_listen", e.getMessage());
            }
        }
        n.finish();
        return new HistorianConfig(file, ingest, owner, List.copyOf(lines), batch, poll, keep, metrics);
    }

    private static char[] password(SpecNode db, Path base, String fileKey, String envKey, boolean secrets, boolean openOk) throws ConfigException {
        String f = db.optText(fileKey, null), env = db.optText(envKey, null);
        if (f != null && env != null) throw db.error(fileKey, "give " + fileKey + " or " + envKey + ", not both");
        if (!secrets) return null;
        if (env != null) {
            String v = System.getenv(env);
            if (v == null) throw db.error(envKey, "environment variable " + env + " is not set");
            return v.toCharArray();
        }
        if (f == null) return null;
        return net.zbin.io.Secrets.password(db.file(), db.key(fileKey), base.resolve(f), openOk, db.key("allow_open_secrets"));
    }
}
