package net.zbin.io.meter;

import java.nio.file.Path;
import java.util.HashMap;
import java.util.HashSet;
import java.util.List;
import java.util.Map;
import java.util.regex.Pattern;
import java.util.regex.PatternSyntaxException;
import net.zbin.io.ConfigException;
import net.zbin.io.SpecNode;
import net.zbin.io.Yaml;

/** Loads {@code config/meters/*.yaml} into a {@link MeterProfile}. */
public final class MeterProfileLoader {
    private MeterProfileLoader() {}

    public static MeterProfile load(Path file) throws ConfigException {
        SpecNode n = Yaml.read(file);
        String name = n.text("meter");
        n.optText("description", "");
        String term = n.optText("terminator", "\n");
        SpecNode id = n.child("identify");
        String idQuery = id.optText("query", null);
        Pattern idExpect = regex(id, "expect");
        id.finish();
        List<String> setup = n.values("setup", s -> s);
        SpecNode sp = n.child("speeds");
        Map<String, String> speeds = new HashMap<>();
        for (String s : List.of("fast", "medium", "slow")) speeds.put(s, sp.optText(s, s));
        sp.finish();
        SpecNode sy = n.child("sync");
        String syncQ = sy.optText("query", null);
        Pattern syncE = regex(sy, "expect");
        sy.finish();
        if (!n.has("measure")) throw n.error("measure", "is required (query and timeout_ms)");
        SpecNode me = n.child("measure");
        String mq = me.text("query");
        int mt = me.optInteger("timeout_ms", 2000);
        boolean confirm = me.optBool("confirm", syncQ != null);
        me.finish();
        if (!n.has("response")) throw n.error("response", "is required (separator and fields)");
        SpecNode re = n.child("response");
        String sep = re.optText("separator", ",");
        List<MeterProfile.Field> fields = re.values("fields", MeterProfile.Field::parse);
        String ok = re.optText("status_ok", null);
        List<String> ovl = re.values("status_overload", s -> s);
        re.finish();
        SpecNode er = n.child("error");
        String eq = er.optText("query", null);
        Pattern none = regex(er, "none");
        er.finish();
        SpecNode to = n.child("timeouts");
        int ct = to.optInteger("command_ms", 1000);
        to.finish();
        if (!n.has("transport")) throw n.error("transport", "is required (tcp: {host, port} or serial: {port, baud, ...})");
        TransportSpec transport = TransportSpecs.parse(n.child("transport"));
        MeterProfile.Range parsedRange = null;
        if (n.has("range")) {
            SpecNode ra = n.child("range");
            double[] f = pair(ra, "freq_hz", net.zbin.core.Unit.HERTZ);
            double[] l = pair(ra, "level_v", net.zbin.core.Unit.VOLT);
            ra.finish();
            parsedRange = n.build("range", () -> new MeterProfile.Range(f[0], f[1], l[0], l[1]));
        }
        MeterProfile.Range range = parsedRange;
        Map<String, String> readback = new HashMap<>();
        SpecNode rb = n.child("readback");
        for (String k : MeterProfile.READBACK) {
            String q = rb.optText(k, null);
            if (q != null) readback.put(k, q);
        }
        rb.finish();
        MeterProfile.Timing timing = null;
        if (n.has("timing")) {
            SpecNode ti = n.child("timing");
            SpecNode rd = ti.child("reading_ms");
            Map<String, Double> perSpeed = new HashMap<>();
            for (String speed : net.zbin.core.TestConditions.SPEEDS) perSpeed.put(speed, rd.number(speed, net.zbin.core.Unit.RATIO));
            rd.finish();
            double sw = ti.number("switch_ms", net.zbin.core.Unit.RATIO);
            ti.finish();
            timing = n.build("timing", () -> new MeterProfile.Timing(perSpeed, sw));
        }
        MeterProfile.Timing timed = timing;
        SpecNode rc = n.child("reconnect");
        int ri = rc.optInteger("initial_ms", 100), rm = rc.optInteger("max_ms", 5000);
        rc.finish();
        n.finish();
        return n.build(null, () -> new MeterProfile(name, term, idQuery, idExpect, setup, speeds, syncQ, syncE, mq, mt, sep,
                fields, ok, new HashSet<>(ovl), eq, none, ct, transport, ri, rm, confirm, range, readback, timed));
    }

    /** A [min, max] pair of numbers in the unit, SI prefixes allowed. */
    private static double[] pair(SpecNode n, String key, net.zbin.core.Unit unit) throws ConfigException {
        if (!n.has(key)) throw n.error(key, "is required: [min, max]");
        List<Double> v = n.values(key, t -> net.zbin.core.SiValue.parse(t, unit));
        if (v.size() != 2) throw n.error(key, "must be [min, max] (was " + v.size() + " values)");
        return new double[] {v.get(0), v.get(1)};
    }

    private static Pattern regex(SpecNode n, String key) throws ConfigException {
        String s = n.optText(key, null);
        if (s == null) return null;
        try {
            return Pattern.compile(s);
        } catch (PatternSyntaxException e) {
            throw n.error(key, "not a valid regular expression: " + e.getDescription());
        }
    }
}
