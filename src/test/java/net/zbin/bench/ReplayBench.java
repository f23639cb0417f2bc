package net.zbin.bench;

import static org.junit.jupiter.api.Assertions.assertEquals;

import com.fasterxml.jackson.databind.node.ObjectNode;
import java.io.BufferedReader;
import java.io.BufferedWriter;
import java.io.PrintWriter;
import java.io.StringWriter;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Locale;
import java.util.Random;
import net.zbin.app.Main;
import net.zbin.io.Json;
import org.junit.jupiter.api.Test;

/**
 * Replay and tune against their floor, on the same 1 M-row file in one run: the floor is a bare loop that
 * reads the lines and parses the three numbers a grading needs with {@code Double.parseDouble}. Run with
 * {@code mvn -B -Pbench test}; results in {@code target/bench/replay.json}.
 */
class ReplayBench {
    static final int ROWS = 1_000_000;
    static final String RECIPE = "config/recipes/mlcc-x7r-100n.yaml";

    static Path lot() throws Exception { return lot(ROWS); }

    /** A record-log-shaped CSV of {@code rows} invented MLCC readings, written once under target/bench. */
    static Path lot(int rows) throws Exception {
        Path dir = Files.createDirectories(Path.of("target/bench"));
        Path f = dir.resolve(rows == ROWS ? "lot-1m.csv" : "lot-" + rows + ".csv");
        if (Files.exists(f)) return f;
        Random rnd = new Random(64);
        double w = 2 * Math.PI * 1000;
        try (BufferedWriter out = Files.newBufferedWriter(f)) {
            out.write("time,lot,seq,freq_hz,r_ohm,x_ohm,note\n");
            for (int i = 0; i < rows; i++) {
                double c = 100e-9 * (1 + rnd.nextGaussian() * 0.08);
                if (i % 97 == 0) c = 2e-12;
                double x = -1 / (w * c), r = Math.abs(rnd.nextGaussian() * 0.012) * Math.abs(x);
                out.write("2026-11-30T07:00:00Z,HG-2611-09," + i + ",1000," + r + "," + x + ",\"a, quoted note\"\n");
            }
        }
        return f;
    }

    /** The floor: read every line and parse freq_hz, r_ohm and x_ohm (fields 4–6) with Double.parseDouble. */
    static double floor(Path f) throws Exception {
        double sum = 0;
        try (BufferedReader in = Files.newBufferedReader(f, StandardCharsets.UTF_8)) {
            in.readLine();
            String line;
            while ((line = in.readLine()) != null) {
                int a = nth(line, 3), b = line.indexOf(',', a + 1), c = line.indexOf(',', b + 1), d = line.indexOf(',', c + 1);
                sum += Double.parseDouble(line.substring(a + 1, b)) + Double.parseDouble(line.substring(b + 1, c))
                        + Double.parseDouble(line.substring(c + 1, d));
            }
        }
        return sum;
    }

    private static int nth(String s, int n) {
        int i = -1;
        for (int k = 0; k < n; k++) i = s.indexOf(',', i + 1);
        return i;
    }

    static int run(String... args) {
        return Main.execute(args, new PrintWriter(new StringWriter()), new PrintWriter(new StringWriter()));
    }

    /** Best of {@code n} timings in seconds. */
    static double best(int n, ThrowingRunnable r) throws Exception {
        double best = Double.MAX_VALUE;
        for (int i = 0; i < n; i++) {
            long t0 = System.nanoTime();
            r.run();
            best = Math.min(best, (System.nanoTime() - t0) / 1e9);
        }
        return best;
    }

    interface ThrowingRunnable {
        void run() throws Exception;
    }

    @Test
    void replayAndTune_againstTheBareParseFloor() throws Exception {
        Path f = lot();
        String in = f.toString();
        best(1, () -> floor(f)); // warm-up
        assertEquals(0, run("replay", "--recipe", RECIPE, "--in", in, "--json"));
        assertEquals(0, run("tune", "--recipe", RECIPE, "--in", in, "--vary", "grade.J=1:5:1", "--json"));
        assertEquals(0, run("tune", "--recipe", RECIPE, "--in", in, "--vary", "d_max=0.02:0.03:0.005", "--json"));
        double floorS = best(3, () -> floor(f));
        double replayS = best(3, () -> assertEquals(0, run("replay", "--recipe", RECIPE, "--in", in, "--json")));
        double tuneS = best(3, () -> assertEquals(0, run("tune", "--recipe", RECIPE, "--in", in, "--vary", "grade.J=0.1:9.99:0.1", "--json")));
        double gateS = best(3, () -> assertEquals(0, run("tune", "--recipe", RECIPE, "--in", in, "--vary", "d_max=0.010:0.0595:0.0005", "--json")));
        ObjectNode n = Json.object();
        n.put("rows", ROWS);
        n.put("machine", Runtime.getRuntime().availableProcessors() + " cores, " + System.getProperty("java.vm.name") + " " + System.getProperty("java.version"));
        n.put("floor_s", floorS);
        n.put("floor_rows_per_s", ROWS / floorS);
        n.put("replay_s", replayS);
        n.put("replay_rows_per_s", ROWS / replayS);
        n.put("replay_vs_floor", floorS / replayS);
        n.put("tune_100_limit_settings_s", tuneS);
        n.put("tune_vs_replay", tuneS / replayS);
        n.put("tune_100_gate_settings_s", gateS);
        Files.writeString(Path.of("target/bench/replay.json"), Json.mapper().writerWithDefaultPrettyPrinter().writeValueAsString(n));
        System.out.printf(Locale.ROOT, "%n  %-44s %10s %14s%n", "1 M rows, best of runs", "seconds", "rows/s");
        System.out.printf(Locale.ROOT, "  %-44s %10.3f %14.0f%n", "floor: read lines + Double.parseDouble x3", floorS, ROWS / floorS);
        System.out.printf(Locale.ROOT, "  %-44s %10.3f %14.0f   (%.2f x the floor)%n", "zbin replay --json", replayS, ROWS / replayS, floorS / replayS);
        System.out.printf(Locale.ROOT, "  %-44s %10.3f %14s   (%.2f x one replay)%n", "zbin tune, 100 limit settings", tuneS, "", tuneS / replayS);
        System.out.printf(Locale.ROOT, "  %-44s %10.3f %14s   (%.2f x one replay)%n%n", "zbin tune, 100 gate settings", gateS, "", gateS / replayS);
    }
}
