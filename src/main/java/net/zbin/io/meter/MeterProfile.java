package net.zbin.io.meter;

import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

/**
 * Everything zbin needs to talk to one meter model, read from a profile file: no code per meter.
 *
 * @param name             profile id
 * @param terminator       line terminator for both directions ("\n", "\r\n", …)
 * @param identifyQuery    identification query, e.g. "*IDN?"
 * @param identifyExpect   regex the identification must match (null: anything)
 * @param setup            commands sent when test conditions change; placeholders {freq_hz}, {level_v}, {speed}, {averaging}
 * @param speedNames       the meter's words for fast, medium, slow
 * @param syncQuery        query sent after setup to wait until it is applied (null: none)
 * @param syncExpect       regex the sync reply must match
 * @param measureQuery     query that triggers and returns one reading
 * @param measureTimeoutMs how long a reading may take
 * @param separator        field separator in the reply (a literal string)
 * @param fields           meaning of each reply field, in order
 * @param statusOk         the OK value of the status field (null when there is none)
 * @param statusOverload   status values that mean overload
 * @param errorQuery       query that reads the meter's error queue (null: none)
 * @param errorNone        regex of the "no error" reply
 * @param commandTimeoutMs timeout of every other query
 * @param transport        default link (a line config may override it)
 * @param reconnectInitialMs first reconnect delay
 * @param reconnectMaxMs   largest reconnect delay (doubling from the first)
 * @param confirmReadings  true: each measure query goes out with the sync query behind it, and a reading counts only
 *                         when the sync answer follows it (proves the reply answers this query); needs a sync query
 * @param range            the test conditions the meter can set, for warnings before a line starts (null: not stated)
 * @param readback         placeholder name (freq_hz, level_v) → query that reads the setting back after a setup
 */
public record MeterProfile(String name, String terminator, String identifyQuery, Pattern identifyExpect, List<String> setup,
                           Map<String, String> speedNames, String syncQuery, Pattern syncExpect, String measureQuery,
                           int measureTimeoutMs, String separator, List<Field> fields, String statusOk,
                           Set<String> statusOverload, String errorQuery, Pattern errorNone, int commandTimeoutMs,
                           TransportSpec transport, int reconnectInitialMs, int reconnectMaxMs, boolean confirmReadings,
                           Range range, Map<String, String> readback, Timing timing) {

    /**
     * How long the meter takes, as its data sheet (or a measurement) states it, for {@code check} to add up a test
     * plan against the handler's deadline. Not used to time anything out.
     *
     * @param readingMs milliseconds of one reading at averaging 1, by zbin speed (fast, medium, slow)
     * @param switchMs  milliseconds to set other conditions and let them settle (a plan's change of step)
     */
    public record Timing(Map<String, Double> readingMs, double switchMs) {
        public Timing {
            readingMs = Map.copyOf(readingMs);
            for (String sp : net.zbin.core.TestConditions.SPEEDS)
                if (!(readingMs.getOrDefault(sp, Double.NaN) >= 0)) throw new IllegalArgumentException("timing.reading_ms." + sp + " is required (>= 0)");
            if (!(switchMs >= 0)) throw new IllegalArgumentException("timing.switch_ms must be >= 0 (was " + switchMs + ")");
        }

        /** One reading at these conditions, in ms. */
        public double readingMs(net.zbin.core.TestConditions t) { return readingMs.get(t.speed()) * t.averaging(); }

        /**
         * The longest a part of this plan can take at the meter, in ms: the value step's readings (all of them when it
         * re-measures), each later step's switch and reading, and the switch back to the value step for the next part.
         */
        public double planMs(net.zbin.core.Recipe r) {
            double ms = readingMs(r.test()) * r.remeasure().maxReadings();
            for (net.zbin.core.TestStep st : r.steps()) ms += switchMs + readingMs(st.test());
            return r.steps().isEmpty() ? ms : ms + switchMs;
        }
    }

    /**
     * What the meter can set, as its data sheet states it. zbin does not rely on it to catch a refused
     * setting (the error query and the read-back do that); it lets {@code check} warn before the line starts.
     *
     * @param freqMinHz lowest test frequency in Hz
     * @param freqMaxHz highest test frequency in Hz
     * @param levelMinV lowest AC test level in volts rms
     * @param levelMaxV highest AC test level in volts rms
     */
    public record Range(double freqMinHz, double freqMaxHz, double levelMinV, double levelMaxV) {
        public Range {
            if (!(freqMinHz > 0) || !(freqMaxHz >= freqMinHz))
                throw new IllegalArgumentException("range.freq_hz must be [min, max] with 0 < min <= max (was [" + freqMinHz + ", " + freqMaxHz + "])");
            if (!(levelMinV > 0) || !(levelMaxV >= levelMinV))
                throw new IllegalArgumentException("range.level_v must be [min, max] with 0 < min <= max (was [" + levelMinV + ", " + levelMaxV + "])");
        }

        /** What of the conditions lies outside the range, or null when all fits. */
        public String outside(net.zbin.core.TestConditions c) {
            if (c.freqHz() < freqMinHz || c.freqHz() > freqMaxHz)
                return "frequency " + net.zbin.core.SiValue.format(c.freqHz(), "Hz") + " is outside the meter's "
                        + net.zbin.core.SiValue.format(freqMinHz, "Hz") + " .. " + net.zbin.core.SiValue.format(freqMaxHz, "Hz");
            if (c.levelV() < levelMinV || c.levelV() > levelMaxV)
                return "level " + net.zbin.core.SiValue.format(c.levelV(), "V") + " is outside the meter's "
                        + net.zbin.core.SiValue.format(levelMinV, "V") + " .. " + net.zbin.core.SiValue.format(levelMaxV, "V");
            return null;
        }
    }

    /** Settings that can be read back after a setup. */
    public static final Set<String> READBACK = Set.of("freq_hz", "level_v");

    /** What one reply field means. */
    public enum Field {
        R_OHM("r_ohm"), X_OHM("x_ohm"), Z_OHM("z_ohm"), THETA_DEG("theta_deg"), THETA_RAD("theta_rad"),
        STATUS("status"), IGNORE("ignore");

        private final String key;

        Field(String key) { this.key = key; }

        public String key() { return key; }

        public static Field parse(String s) {
            for (Field f : values()) if (f.key.equals(s)) return f;
            throw new IllegalArgumentException("unknown field '" + s + "' (r_ohm, x_ohm, z_ohm, theta_deg, theta_rad, status, ignore)");
        }
    }

    public static final Set<String> PLACEHOLDERS = Set.of("freq_hz", "level_v", "speed", "averaging");
    private static final Pattern PLACEHOLDER = Pattern.compile("\\{([a-z_]*)}");

    public MeterProfile {
        if (terminator == null || terminator.isEmpty()) throw new IllegalArgumentException("terminator must not be empty");
        if (measureQuery == null || measureQuery.isBlank()) throw new IllegalArgumentException("measure.query is required");
        setup = List.copyOf(setup);
        fields = List.copyOf(fields);
        statusOverload = Set.copyOf(statusOverload);
        speedNames = Map.copyOf(speedNames);
        for (String s : setup) {
            Matcher m = PLACEHOLDER.matcher(s);
            while (m.find())
                if (!PLACEHOLDERS.contains(m.group(1)))
                    throw new IllegalArgumentException("setup command '" + s + "' has unknown placeholder {" + m.group(1) + "} (known: " + PLACEHOLDERS + ")");
        }
        boolean rx = fields.contains(Field.R_OHM) && fields.contains(Field.X_OHM);
        boolean polar = fields.contains(Field.Z_OHM) && (fields.contains(Field.THETA_DEG) || fields.contains(Field.THETA_RAD));
        if (rx == polar) throw new IllegalArgumentException("response.fields must hold r_ohm and x_ohm, or z_ohm with theta_deg or theta_rad");
        if (fields.contains(Field.THETA_DEG) && fields.contains(Field.THETA_RAD))
            throw new IllegalArgumentException("response.fields: give theta in degrees or radians, not both");
        for (Field f : Field.values())
            if (f != Field.IGNORE && fields.stream().filter(x -> x == f).count() > 1)
                throw new IllegalArgumentException("response.fields names " + f.key() + " twice");
        if (fields.contains(Field.STATUS) && statusOk == null)
            throw new IllegalArgumentException("response.status_ok is required when fields include status");
        if (measureTimeoutMs < 1 || commandTimeoutMs < 1) throw new IllegalArgumentException("timeouts must be >= 1 ms");
        if (reconnectInitialMs < 1 || reconnectMaxMs < reconnectInitialMs)
            throw new IllegalArgumentException("reconnect: initial_ms must be >= 1 and max_ms >= initial_ms");
        if (syncQuery != null && syncExpect == null) throw new IllegalArgumentException("sync.expect is required with sync.query");
        if (confirmReadings && syncQuery == null)
            throw new IllegalArgumentException("measure.confirm needs sync.query: the sync answer behind a reading is what proves it");
        readback = Map.copyOf(readback);
        for (String k : readback.keySet())
            if (!READBACK.contains(k)) throw new IllegalArgumentException("readback." + k + ": not a setting that can be read back (known: " + READBACK + ")");
    }

    public MeterProfile withTransport(TransportSpec t) {
        return new MeterProfile(name, terminator, identifyQuery, identifyExpect, setup, speedNames, syncQuery, syncExpect,
                measureQuery, measureTimeoutMs, separator, fields, statusOk, statusOverload, errorQuery, errorNone,
                commandTimeoutMs, t, reconnectInitialMs, reconnectMaxMs, confirmReadings, range, readback, timing);
    }

    /** A setup template with the test conditions filled in. */
    public String fill(String template, net.zbin.core.TestConditions c) {
        return template.replace("{freq_hz}", num(c.freqHz())).replace("{level_v}", num(c.levelV()))
                .replace("{speed}", speedNames.getOrDefault(c.speed(), c.speed()))
                .replace("{averaging}", Integer.toString(c.averaging()));
    }

    private static String num(double v) {
        if (v == Math.rint(v) && Math.abs(v) < 1e15) return Long.toString((long) v);
        return Double.toString(v);
    }
}
