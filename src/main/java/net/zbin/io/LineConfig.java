package net.zbin.io;

import net.zbin.core.FixtureBounds;
import java.nio.file.Path;
import net.zbin.core.FixtureCheck;
import net.zbin.core.FixtureLimits;
import net.zbin.io.meter.MeterProfile;

/**
 * A validated line configuration: everything {@code zbin run} needs. Paths are resolved against
 * the config file's folder.
 *
 * @param file            the config file itself
 * @param line            line id, part of every topic
 * @param mqtt            broker settings
 * @param meter           meter profile with the line's transport
 * @param recipeDir       folder of recipe files
 * @param activeRecipe    recipe id in force at start
 * @param stateDir        folder for compensation data and other state
 * @param records         record-log settings
 * @param deadlineMs      handler's index time: a decision later than this counts as late
 * @param repeatWindowMs  a trigger with the seq, part and lot of a decided presentation within this is a repeat
 * @param dashboardMs     period of the dashboard publish
 * @param fixture         plausibility limits for compensation captures
 * @param checks          drift limits for the handler's open/short check presentations
 * @param bounds          what the fixture itself reads, for telling an open or short from a part
 * @param monitor         the line's monitor settings: alarms that pause the line, compensation age limit
 * @param status          the line's status page and metrics, or null: none served
 * @param pinCpu          the CPU every thread of {@code zbin run} keeps to from ready on, or null: every CPU
 */
public record LineConfig(Path file, String line, MqttSettings mqtt, MeterProfile meter, Path recipeDir, String activeRecipe,
                         Path stateDir, RecordSettings records, int deadlineMs, int repeatWindowMs, int dashboardMs, FixtureLimits fixture,
                         FixtureCheck.Limits checks, FixtureBounds bounds, Monitor monitor, Status status, Integer pinCpu) {
    /** Linux numbers CPUs from 0 up to its configured maximum (4096 in the common kernels). */
    public static final int MAX_CPU = 4095;

    /**
     * Where the status page and {@code /metrics} are served.
     *
     * @param host      address to bind (a loopback address keeps the page on this host)
     * @param port      TCP port, 0: any free one (the log and {@code demo} say which)
     * @param operators who may pause, resume and acknowledge alarms from the page, or null: the page is read-only
     * @param tlsCert   server certificate chain (PEM) for HTTPS, or null: plain HTTP (refused with operators off loopback)
     * @param tlsKey    its PKCS#8 key (PEM)
     */
    public record Status(String host, int port, Operators operators, Path tlsCert, Path tlsKey) {
        public Status {
            if (port < 0 || port > 65535) throw new net.zbin.core.SpecException("status.listen", "port must be 0..65535 (was " + port + ")");
            if ((tlsCert == null) != (tlsKey == null)) throw new net.zbin.core.SpecException("status.tls", "cert_file and key_file go together");
        }

        public boolean tls() { return tlsCert != null; }

        /** True when the address to bind is a loopback one: only this host reaches the page. */
        public boolean loopback() {
            try {
                return java.net.InetAddress.getByName(host).isLoopbackAddress();
            } catch (java.net.UnknownHostException e) {
                return false;
            }
        }
    }

    /**
     * @param pauseOn     alarm codes that pause the line while active (default none)
     * @param compMaxAgeH compensation age limit in hours for every recipe of the line, NaN: each recipe's own
     */
    public record Monitor(java.util.Set<net.zbin.core.AlarmCode> pauseOn, double compMaxAgeH) {
        public static final Monitor DEFAULT = new Monitor(java.util.Set.of(), Double.NaN);

        public Monitor {
            pauseOn = java.util.Set.copyOf(pauseOn);
            if (!Double.isNaN(compMaxAgeH) && !(compMaxAgeH > 0))
                throw new net.zbin.core.SpecException("monitor.compensation_max_age_h", "must be > 0 (was " + compMaxAgeH + ")");
        }
    }

    /** A recipe's monitor settings on this line: the recipe's own, with the line's compensation age limit where it states one. */
    public net.zbin.core.MonitorSettings monitorSettings(net.zbin.core.Recipe r) {
        net.zbin.core.MonitorSettings m = r.monitor();
        return Double.isNaN(monitor.compMaxAgeH()) ? m : m.withCompMaxAgeH(monitor.compMaxAgeH());
    }

    /** The engine that decides this line's parts under a recipe: the line's check limits and monitor settings. */
    public net.zbin.core.LineEngine engine(net.zbin.core.Recipe r) {
        return new net.zbin.core.LineEngine(r, monitorSettings(r), checks);
    }

    public LineConfig {
        if (monitor == null) monitor = Monitor.DEFAULT;
        if (pinCpu != null && (pinCpu < 0 || pinCpu > MAX_CPU))
            throw new net.zbin.core.SpecException("pin_cpu", "must be a CPU number 0.." + MAX_CPU + " (was " + pinCpu + ")");
        if (line == null || !line.matches("[A-Za-z0-9][A-Za-z0-9._-]{0,63}"))
            throw new net.zbin.core.SpecException("line", "must be 1..64 letters, digits, '.', '_' or '-' (was '" + line + "')");
        if (deadlineMs < 1) throw new net.zbin.core.SpecException("handler.deadline_ms", "must be >= 1 (was " + deadlineMs + ")");
        if (repeatWindowMs < 0 || repeatWindowMs > 600_000)
            throw new net.zbin.core.SpecException("handler.repeat_window_ms", "must be 0..600000 (was " + repeatWindowMs + ")");
        if (dashboardMs < 100) throw new net.zbin.core.SpecException("dashboard.interval_s", "must be >= 0.1 (was " + dashboardMs / 1000.0 + ")");
        for (Object o : new Object[] {mqtt, meter, recipeDir, activeRecipe, stateDir, records, fixture, checks, bounds})
            if (o == null) throw new IllegalArgumentException("every part of a line config is required");
    }

    /**
     * @param broker        tcp://host:port or ssl://host:port
     * @param topicRoot     first topic level (default "zbin")
     * @param clientId      MQTT client id, unique per process
     * @param username      null for anonymous
     * @param password      null for none; read from a file or environment variable, never logged
     * @param caFile        CA certificate (PEM) for ssl://, or null
     * @param certFile      client certificate (PEM), or null
     * @param keyFile       client key (PKCS#8 PEM), or null
     * @param keepAliveS    MQTT keep-alive in seconds
     */
    public record MqttSettings(String broker, String topicRoot, String clientId, String username, char[] password,
                               Path caFile, Path certFile, Path keyFile, int keepAliveS) {
        public MqttSettings {
            password = password == null ? null : password.clone(); // immutable: the caller's array may be cleared
        }

        /** A copy of the password (null: none): the settings stay as loaded whatever the caller does with it. */
        @Override
        public char[] password() { return password == null ? null : password.clone(); }

        @Override
        public boolean equals(Object o) {
            return o instanceof MqttSettings m && broker.equals(m.broker) && topicRoot.equals(m.topicRoot)
                    && java.util.Objects.equals(clientId, m.clientId) && java.util.Objects.equals(username, m.username)
                    && java.util.Arrays.equals(password, m.password) && java.util.Objects.equals(caFile, m.caFile)
                    && java.util.Objects.equals(certFile, m.certFile) && java.util.Objects.equals(keyFile, m.keyFile) && keepAliveS == m.keepAliveS;
        }

        @Override
        public int hashCode() { return java.util.Objects.hash(broker, topicRoot, clientId, username, caFile, certFile, keyFile, keepAliveS); }

        @Override
        public String toString() {
            return "MqttSettings[broker=" + broker + ", topicRoot=" + topicRoot + ", clientId=" + clientId
                    + ", username=" + username + ", password=" + (password == null ? "none" : "****") + "]";
        }
    }

    /**
     * @param dir         folder of the daily CSV files
     * @param flushMs     rows are flushed to disk at least this often (kill -9 loses at most this much)
     * @param rotateBytes a file is closed and a new one started past this size
     * @param pauseOnFailure true: the line pauses when the log cannot be written
     */
    public record RecordSettings(Path dir, int flushMs, long rotateBytes, boolean pauseOnFailure) {
        public RecordSettings {
            if (dir == null) throw new net.zbin.core.SpecException("records.dir", "is required");
            if (flushMs < 0 || flushMs > 60_000) throw new net.zbin.core.SpecException("records.flush_ms", "must be 0..60000 (was " + flushMs + ")");
            if (rotateBytes < 1024) throw new net.zbin.core.SpecException("records.rotate_mb", "must be at least 1 KiB (was " + rotateBytes + " bytes)");
        }
    }
}
