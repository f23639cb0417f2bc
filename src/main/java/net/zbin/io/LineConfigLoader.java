package net.zbin.io;

import net.zbin.core.FixtureBounds;
import net.zbin.core.Unit;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import net.zbin.core.FixtureCheck;
import net.zbin.core.FixtureLimits;
import net.zbin.io.mqtt.TlsFiles;
import net.zbin.io.meter.MeterProfile;
import net.zbin.io.meter.MeterProfileLoader;
import net.zbin.io.meter.TransportSpecs;

/**
 * Loads a line config and everything it names (meter profile, recipe folder, TLS files). Fails
 * closed: a missing file, an unknown key or an unreadable secret stops the start with a message.
 */
public final class LineConfigLoader {
    private LineConfigLoader() {}

    /** The key that accepts a secret file group or others can read, with a warning. */
    static final String OPEN_SECRETS = "mqtt.allow_open_secrets";

    public static LineConfig load(Path file) throws ConfigException {
        SpecNode n = Yaml.read(file);
        Path base = file.toAbsolutePath().getParent();
        String line = n.text("line");
        if (!line.matches("[A-Za-z0-9_-]{1,32}")) throw n.error("line", "must be 1..32 letters, digits, '_' or '-' (was '" + line + "')");
        n.optText("description", "");

        SpecNode m = n.child("mqtt");
        String broker = m.optText("broker", "tcp://127.0.0.1:1883");
        if (!broker.matches("(tcp|ssl)://[^/:]+:\\d{1,5}")) throw m.error("broker", "must be tcp://host:port or ssl://host:port (was '" + broker + "')");
        String root = m.optText("topic_root", "zbin");
        if (root.isEmpty() || root.contains("+") || root.contains("#") || root.startsWith("/") || root.endsWith("/"))
            throw m.error("topic_root", "must be a plain topic prefix without wildcards or outer slashes (was '" + root + "')");
        String clientId = m.optText("client_id", "zbin-" + line); // stable per line: one line, one daemon (a lock keeps it so)
        String user = m.optText("username", null);
        String pwFile = m.optText("password_file", null), pwEnv = m.optText("password_env", null);
        if (pwFile != null && pwEnv != null) throw m.error("password_file", "give password_file or password_env, not both");
        char[] password = null;
        boolean openSecretsAllowed = m.optBool("allow_open_secrets", false);
        if (pwFile != null) {
            password = Secrets.password(file, m.key("password_file"), base.resolve(pwFile), openSecretsAllowed, OPEN_SECRETS);
        }
        if (pwEnv != null) {
            String v = System.getenv(pwEnv);
            if (v == null) throw m.error("password_env", "environment variable " + pwEnv + " is not set");
            password = v.toCharArray();
        }
        SpecNode tls = m.child("tls");
        Path ca = optFile(tls, "ca_file", base), cert = optFile(tls, "cert_file", base), key = optFile(tls, "key_file", base);
        tls.finish();
        if (broker.startsWith("ssl://") && ca == null) throw m.error("tls.ca_file", "is required for an ssl:// broker");
        if ((cert == null) != (key == null)) throw m.error("tls.cert_file", "cert_file and key_file go together");
        // Fail closed: a TLS file that is named but cannot be loaded stops the start, naming the key.
        String problem;
        if (ca != null && (problem = TlsFiles.certificateProblem(ca)) != null) throw m.error("tls.ca_file", ca + " " + problem);
        if (cert != null && (problem = TlsFiles.certificateProblem(cert)) != null) throw m.error("tls.cert_file", cert + " " + problem);
        if (key != null && (problem = TlsFiles.keyProblem(key)) != null) throw m.error("tls.key_file", key + " " + problem);
        if (key != null) Secrets.checkMode(file, m.key("tls.key_file"), key, openSecretsAllowed, OPEN_SECRETS);
        int keepAlive = m.optInteger("keepalive_s", 10);
        if (keepAlive < 2 || keepAlive > 600) throw m.error("keepalive_s", "must be 2..600 (was " + keepAlive + ")");
        m.finish();

        SpecNode me = n.child("meter");
        if (!n.has("meter")) throw n.error("meter", "is required (profile and optionally transport)");
        Path profileFile = base.resolve(me.text("profile"));
        MeterProfile profile;
        try {
            profile = MeterProfileLoader.load(profileFile);
        } catch (ConfigException e) {
            throw me.error("profile", e.getMessage()); // the config's key first, then the profile's own file and key
        }
        if (me.has("transport")) profile = profile.withTransport(TransportSpecs.parse(me.child("transport")));
        me.finish();

        SpecNode r = n.child("recipes");
        Path recipeDir = base.resolve(r.optText("dir", "recipes")).normalize();
        if (!Files.isDirectory(recipeDir)) throw r.error("dir", "recipe folder " + recipeDir + " does not exist");
        String active = r.text("active");
        Path activeFile = recipeDir.resolve(active + ".yaml");
        if (!Files.exists(activeFile)) throw r.error("active", "no recipe file " + activeFile);
        try {
            RecipeLoader.load(activeFile);
        } catch (ConfigException e) {
            throw r.error("active", e.getMessage());
        }
        r.finish();

        Path state = base.resolve(n.optText("state_dir", "state")).normalize();
        Integer pinCpu = n.has("pin_cpu") ? n.integer("pin_cpu") : null; // its range: the record's

        SpecNode rec = n.child("records");
        Path recDir = base.resolve(rec.optText("dir", "records")).normalize();
        int flush = rec.optInteger("flush_ms", 200);
        if (flush < 0 || flush > 60_000) throw rec.error("flush_ms", "must be 0..60000 (was " + flush + ")");
        double rotateMb = rec.optNumber("rotate_mb", 64, Unit.RATIO);
        if (!(rotateMb >= 0.001)) throw rec.error("rotate_mb", "must be > 0 (was " + rotateMb + ")");
        String onFail = rec.optText("on_failure", "pause");
        if (!onFail.equals("pause") && !onFail.equals("continue")) throw rec.error("on_failure", "must be pause or continue (was '" + onFail + "')");
        rec.finish();

        SpecNode h = n.child("handler");
        int deadline = h.optInteger("deadline_ms", 150);
        if (deadline < 1) throw h.error("deadline_ms", "must be >= 1 (was " + deadline + ")");
        int repeatWindow = h.optInteger("repeat_window_ms", 5000);
        if (repeatWindow < 0 || repeatWindow > 600_000) throw h.error("repeat_window_ms", "must be 0..600000 (was " + repeatWindow + ")");
        h.finish();
        SpecNode d = n.child("dashboard");
        double interval = d.optNumber("interval_s", 5, Unit.SECOND);
        if (!(interval >= 0.1 && interval <= 3600)) throw d.error("interval_s", "must be 0.1..3600 (was " + interval + ")");
        d.finish();

        SpecNode fx = n.child("fixture");
        FixtureLimits dflt = FixtureLimits.DEFAULT;
        double oMax = fx.optNumber("open_max_f", dflt.openMaxF(), Unit.FARAD), gMax = fx.optNumber("open_max_g_s", dflt.openMaxGS(), Unit.SIEMENS),
                sMax = fx.optNumber("short_max_ohm", dflt.shortMaxOhm(), Unit.OHM), lMax = fx.optNumber("load_max_dev_pct", dflt.loadMaxDevPct(), Unit.PERCENT);
        int reps = fx.optInteger("repeats", dflt.repeats());
        double oChk = fx.optNumber("open_check_f", FixtureCheck.Limits.DEFAULT.openDriftMaxF(), Unit.FARAD);
        double sChk = fx.optNumber("short_check_ohm", FixtureCheck.Limits.DEFAULT.shortDriftMaxOhm(), Unit.OHM);
        double dRes = fx.optNumber("d_resolution", FixtureBounds.DEFAULT.dResolution(), Unit.RATIO);
        fx.finish();
        SpecNode mo = n.child("monitor");
        List<net.zbin.core.AlarmCode> pauseOn = mo.values("pause_on", net.zbin.core.AlarmCode::parse);
        double maxAge = mo.optNumber("compensation_max_age_h", Double.NaN, Unit.RATIO);
        mo.finish();
        LineConfig.Monitor monitor = mo.build(null, () -> new LineConfig.Monitor(new java.util.HashSet<>(pauseOn), maxAge));
        LineConfig.Status status = status(n, base, openSecretsAllowed);
        FixtureLimits fl = fx.build(null, () -> new FixtureLimits(oMax, gMax, sMax, lMax, reps));
        FixtureCheck.Limits checks = fx.build(null, () -> new FixtureCheck.Limits(oChk, sChk));
        FixtureBounds bounds = fx.build(null, () -> new FixtureBounds(oMax, gMax, sMax, oChk, sChk, dRes));
        n.finish();
        var mqtt = new LineConfig.MqttSettings(broker, root, clientId, user, password, ca, cert, key, keepAlive);
        var meterProfile = profile;
        boolean pause = onFail.equals("pause");
        return n.build(null, () -> new LineConfig(file, line, mqtt, meterProfile, recipeDir, active, state,
                new LineConfig.RecordSettings(recDir, flush, (long) (rotateMb * 1024 * 1024), pause), deadline, repeatWindow,
                (int) Math.round(interval * 1000), fl, checks, bounds, monitor, status, pinCpu));
    }

    /**
     * The {@code status} section, or null when absent (no page). Operators who may act from the page come from their
     * own file; acting over plain HTTP is refused unless the page is bound to a loopback address.
     */
    private static LineConfig.Status status(SpecNode n, Path base, boolean openSecretsAllowed) throws ConfigException {
        if (!n.has("status")) return null;
        SpecNode s = n.child("status");
        HostPort at;
        try {
            at = HostPort.parse(s.text("listen"));
        } catch (IllegalArgumentException e) {
            throw s.error("listen", e.getMessage());
        }
        String opFile = s.optText("operators_file", null);
        Operators ops = null;
        if (opFile != null) {
            Path p = base.resolve(opFile);
            if (!Files.isReadable(p)) throw s.error("operators_file", "file " + p + " is missing or unreadable");
            Secrets.checkMode(s.file(), s.key("operators_file"), p, openSecretsAllowed, OPEN_SECRETS);
            ops = Operators.load(p);
        }
        SpecNode tls = s.child("tls");
        Path cert = optFile(tls, "cert_file", base), key = optFile(tls, "key_file", base);
        tls.finish();
        if ((cert == null) != (key == null)) throw s.error("tls.cert_file", "cert_file and key_file go together");
        String problem;
        if (cert != null && (problem = TlsFiles.certificateProblem(cert)) != null) throw s.error("tls.cert_file", cert + " " + problem);
        if (key != null && (problem = TlsFiles.keyProblem(key)) != null) throw s.error("tls.key_file", key + " " + problem);
        if (key != null) Secrets.checkMode(s.file(), s.key("tls.key_file"), key, openSecretsAllowed, OPEN_SECRETS);
        s.finish();
        Operators o = ops;
        LineConfig.Status st = s.build(null, () -> new LineConfig.Status(at.host(), at.port(), o, cert, key));
        if (o != null && !st.loopback() && !st.tls())
            throw s.error("tls", "is required when operators may act from a page bound to " + at.host() + " (not a loopback address): "
                    + "give tls.cert_file and tls.key_file, or bind to 127.0.0.1");
        return st;
    }

    private static Path optFile(SpecNode n, String key, Path base) throws ConfigException {
        String s = n.optText(key, null);
        if (s == null) return null;
        Path p = base.resolve(s);
        if (!Files.isReadable(p)) throw n.error(key, "file " + p + " is missing or unreadable");
        return p;
    }

}
