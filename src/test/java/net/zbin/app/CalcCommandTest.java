package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.util.Locale;
import java.util.Random;
import org.apache.commons.math3.complex.Complex;
import org.junit.jupiter.api.Test;

class CalcCommandTest {
    static final ObjectMapper M = new ObjectMapper();

    static JsonNode json(String... args) throws Exception {
        Cli c = Cli.run(args);
        assertEquals(0, c.exit(), c.err());
        return M.readTree(c.out());
    }

    @Test
    void thetaMinus88point4_givesD0point0279Q35point8() throws Exception {
        // IEC 60384-1 (tan δ of a capacitor, δ = 90° − |θ|; D = tan δ, Q = 1/D), from memory: θ = −88.4° → D = tan 1.6° ≈ 0.0279, Q ≈ 35.8.
        JsonNode n = json("calc", "--freq", "1k", "--z", "1000", "--theta", "-88.4", "--json");
        assertEquals(0.0279, n.get("d").asDouble(), 0.00005);
        assertEquals(35.8, n.get("q").asDouble(), 0.05);
        JsonNode h = json("calc", "--freq", "1k", "--z", "1000", "--theta", "45", "--json");
        // The same definitions: θ = 45° → D = Q = 1.
        assertEquals(1.0, h.get("d").asDouble(), 1e-12);
        assertEquals(1.0, h.get("q").asDouble(), 1e-12);
    }

    @Test
    void everyJsonKey_agreesWithIndependentComputation() throws Exception {
        // Independent reference: Commons Math Complex arithmetic on the definitions (Z = R + jX, Y = 1/Z; series/parallel equivalents as in
        // Hayt, Kemmerly & Durbin, Engineering Circuit Analysis, from memory; D, Q per IEC 60384-1).
        Random rnd = new Random(2026);
        String[] keys = {"freq_hz", "r_ohm", "x_ohm", "z_ohm", "theta_deg", "g_s", "b_s", "cs_f", "cp_f", "ls_h", "lp_h",
                "rs_ohm", "rp_ohm", "d", "q", "esr_ohm", "model"};
        for (int i = 0; i < 60; i++) {
            double f = Math.pow(10, 1 + 6 * rnd.nextDouble()), w = 2 * Math.PI * f;
            double r = Math.pow(10, -2 + 6 * rnd.nextDouble()), x = Math.pow(10, -2 + 7 * rnd.nextDouble()) * (rnd.nextBoolean() ? 1 : -1);
            JsonNode n = json("calc", "--freq", fmt(f), "--r", fmt(r), "--x", fmt(x), "--json");
            for (String k : keys) assertTrue(n.has(k), "key " + k);
            Complex z = new Complex(r, x), y = z.reciprocal();
            check(f, n, "freq_hz");
            check(r, n, "r_ohm");
            check(x, n, "x_ohm");
            check(z.abs(), n, "z_ohm");
            check(Math.toDegrees(Math.atan2(x, r)), n, "theta_deg");
            check(y.getReal(), n, "g_s");
            check(y.getImaginary(), n, "b_s");
            check(-1 / (w * x), n, "cs_f");
            check(y.getImaginary() / w, n, "cp_f");
            check(x / w, n, "ls_h");
            check(-1 / (w * y.getImaginary()), n, "lp_h");
            check(r, n, "rs_ohm");
            check(1 / y.getReal(), n, "rp_ohm");
            check(r / Math.abs(x), n, "d");
            check(Math.abs(x) / r, n, "q");
            check(r, n, "esr_ohm");
            double zm = z.abs();
            String model = zm < 100 ? "series" : zm > 10_000 ? "parallel" : x < 0 ? "parallel" : "series";
            assertEquals(model, n.get("model").asText(), "auto model for |Z| " + zm);
        }
    }

    private static String fmt(double v) { return String.format(Locale.ROOT, "%.17g", v); }

    private static void check(double expected, JsonNode n, String key) {
        double got = n.get(key).asDouble();
        assertEquals(expected, got, 1e-9 * Math.abs(expected), key);
    }

    @Test
    void part158pFThrough2pFOpenStray_reports158pFCompensated() throws Exception {
        // Common practice: 158 pF read through ~2 pF of lead stray shows ~160 pF, 158 pF after open compensation.
        double f = 1e6, w = 2 * Math.PI * f, x = -1 / (w * 160e-12);
        JsonNode n = json("calc", "--freq", "1M", "--r", "0", "--x", fmt(x), "--open-c", "2p", "--json");
        assertEquals(158e-12, n.get("cp_f").asDouble(), 0.01e-12);
        assertEquals("user", n.get("comp").asText());
        assertEquals(x, n.get("raw_x_ohm").asDouble(), 1e-9 * Math.abs(x));
    }

    @Test
    void withRecipe_printsADecisionWithTheContractFields() throws Exception {
        double w = 2 * Math.PI * 1000, x = -1 / (w * 101e-9);
        JsonNode n = json("calc", "--freq", "1k", "--r", fmt(0.01 * Math.abs(x)), "--x", fmt(x),
                "--recipe", "config/recipes/mlcc-x7r-100n.yaml", "--json");
        JsonNode d = n.get("decision");
        for (String k : new String[] {"seq", "part", "lot", "kind", "bin", "grade", "verdict", "reason", "recipe", "model",
                "param", "value", "unit", "dev_pct", "d", "q", "esr_ohm", "theta_deg", "z_ohm", "freq_hz", "r_ohm", "x_ohm",
                "comp", "latency_ms", "repeat"})
            assertTrue(d.has(k), "decision key " + k);
        assertEquals(1, d.get("bin").asInt());
        assertEquals("J", d.get("grade").asText());
        assertEquals("Cs", d.get("param").asText());
        assertEquals(1.0, d.get("dev_pct").asDouble(), 1e-9);
    }

    @Test
    void badUsage_exits2WithAClearMessage() {
        Cli both = Cli.run("calc", "--freq", "1k", "--r", "1", "--x", "2", "--z", "3", "--theta", "4");
        assertEquals(2, both.exit());
        assertTrue(both.err().contains("one form"), both.err());
        Cli neg = Cli.run("calc", "--freq", "-5", "--r", "1", "--x", "2");
        assertEquals(2, neg.exit());
        assertTrue(neg.err().contains("--freq must be > 0"), neg.err());
        Cli garbage = Cli.run("calc", "--freq", "fast", "--r", "1", "--x", "2");
        assertEquals(2, garbage.exit());
        assertTrue(garbage.err().contains("'fast' is not a number"), garbage.err());
        assertEquals(2, Cli.run("calc", "--freq", "1k", "--r", "1").exit());
        assertEquals(2, Cli.run("calc", "--freq", "1k", "--r", "1", "--x", "-1", "--open-g", "1n").exit());
    }

    @Test
    void textOutput_carriesUnits() {
        Cli c = Cli.run("calc", "--freq", "1k", "--z", "1000", "--theta", "-88.4");
        assertEquals(0, c.exit());
        assertTrue(c.out().contains("159.2 nF"), c.out());
        assertTrue(c.out().contains("1.000 kΩ"), c.out());
        assertTrue(c.out().contains("1.000 kHz"), c.out());
    }

    @Test
    void everyCommandsHelp_readsWell() {
        Cli top = Cli.run("--help");
        assertEquals(0, top.exit());
        for (String cmd : new String[] {"demo", "run", "calc", "check", "replay", "compensate", "sim"}) {
            assertTrue(top.out().contains(cmd), "top help lists " + cmd);
            Cli h = Cli.run(cmd, "--help");
            assertEquals(0, h.exit(), cmd);
            assertTrue(h.out().startsWith("Usage: zbin " + cmd), h.out());
        }
        for (String sim : new String[] {"meter", "handler", "lot"}) {
            Cli h = Cli.run("sim", sim, "--help");
            assertEquals(0, h.exit(), sim);
            assertTrue(h.out().startsWith("Usage: zbin sim " + sim), h.out());
        }
        assertEquals(2, Cli.run("launch").exit(), "unknown command is bad usage");
        assertEquals(2, Cli.run().exit(), "no command is bad usage");
    }
}
