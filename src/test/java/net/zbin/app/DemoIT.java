package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The README's demo command, as a process from the jar. */
class DemoIT {
    @TempDir
    Path dir;

    @Test
    void demoWith2000Parts_exitsZeroAndPrintsTheSummary() throws Exception {
        Process p = new ProcessBuilder("java", "-jar", Jar.path(), "demo", "--parts", "2000", "--out", dir.toString())
                .redirectErrorStream(true).start();
        String out = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
        assertTrue(p.waitFor(5, TimeUnit.MINUTES));
        assertEquals(0, p.exitValue(), out);
        assertTrue(out.contains("of 2000 presented"), out);
        assertTrue(out.contains("latency p50"), out);
        assertTrue(out.contains("missing 0, duplicate 0, contradictory 0, stale 0"), out);
        assertTrue(out.contains("demo ok"), out);
        assertFalse(out.contains("\r"), "no carriage returns into a pipe");
        long parts = 0, passed = 0;
        java.io.File[] logs = dir.resolve("records").toFile().listFiles();
        com.fasterxml.jackson.databind.JsonNode monitor = null;
        for (java.io.File f : logs) { // one file, two if the run crossed midnight UTC
            Cli replay = Cli.run("replay", "--recipe", dir.resolve("recipes/mlcc-x7r-100n.yaml").toString(), "--in", f.toString(), "--json");
            assertEquals(0, replay.exit(), replay.err());
            var j = new com.fasterxml.jackson.databind.ObjectMapper().readTree(replay.out());
            parts += j.path("parts").asLong();
            passed += j.path("passed").asLong();
            monitor = j.path("monitor");
        }
        if (logs.length == 1) {
            // The monitor, replayed from the record log, gives the figures the live line printed.
            java.util.regex.Matcher live = java.util.regex.Pattern.compile(
                    "monitor: deviation mean ([+-][0-9.]+) %, σ ([0-9.]+) %, Cp ([0-9.]+), Cpk ([0-9.]+) over (\\d+) graded parts").matcher(out);
            assertTrue(live.find(), out);
            assertEquals(Double.parseDouble(live.group(1)), monitor.path("dev_mean_pct").asDouble(), 1e-3 * Math.max(1, Math.abs(Double.parseDouble(live.group(1)))));
            assertEquals(Double.parseDouble(live.group(2)), monitor.path("dev_sigma_pct").asDouble(), 1e-3 * Double.parseDouble(live.group(2)));
            assertEquals(Double.parseDouble(live.group(4)), monitor.path("cpk").asDouble(), 0.01);
            assertEquals(Long.parseLong(live.group(5)), monitor.path("parts").asLong());
        }
        // One yield: the handler's summary, the line's own figures and a replay of the record log agree to the last digit.
        java.util.regex.Matcher handler = java.util.regex.Pattern.compile("presented; yield ([0-9.]+) %").matcher(out);
        java.util.regex.Matcher line = java.util.regex.Pattern.compile("the line's own figures for lot \\S+: (\\d+) parts finished, (\\d+) passed, yield ([0-9.]+) %").matcher(out);
        assertTrue(handler.find() && line.find(), out);
        String replayed = String.format(java.util.Locale.ROOT, "%.2f", 100.0 * passed / parts);
        assertEquals(replayed, handler.group(1), "handler summary = replay");
        assertEquals(replayed, line.group(3), "line's figures = replay");
        assertEquals(parts, Long.parseLong(line.group(1)));
        assertEquals(passed, Long.parseLong(line.group(2)));
    }

    /** Runs {@code zbin demo} with these arguments into the temp folder; returns its output (exit 0 asserted). */
    String demo(String... args) throws Exception {
        java.util.List<String> cmd = new java.util.ArrayList<>(java.util.List.of("java", "-jar", Jar.path(), "demo"));
        cmd.addAll(java.util.List.of(args));
        cmd.addAll(java.util.List.of("--out", dir.toString()));
        Process p = new ProcessBuilder(cmd).redirectErrorStream(true).start();
        String out = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
        assertTrue(p.waitFor(5, TimeUnit.MINUTES));
        assertEquals(0, p.exitValue(), out);
        assertTrue(out.contains("demo ok"), out);
        return out;
    }

    /**
     * Replays every record file of the demo with the named recipe and the demo's line config, and holds the totals
     * to the line's own figures printed by the demo; returns the replayed count of a reason.
     */
    long replayEqualsLive(String out, String recipe, String reason) throws Exception {
        long passed = 0, parts = 0, ofReason = 0;
        for (java.io.File f : dir.resolve("records").toFile().listFiles()) {
            Cli replay = Cli.run("replay", "--recipe", dir.resolve("recipes/" + recipe + ".yaml").toString(), "--in", f.toString(), "--json",
                    "--line-config", dir.resolve("line.yaml").toString());
            assertEquals(0, replay.exit(), replay.err());
            var j = new com.fasterxml.jackson.databind.ObjectMapper().readTree(replay.out());
            parts += j.path("parts").asLong();
            passed += j.path("passed").asLong();
            ofReason += j.path("reasons").path(reason).asLong();
        }
        java.util.regex.Matcher line = java.util.regex.Pattern.compile("the line's own figures for lot \\S+: (\\d+) parts finished, (\\d+) passed").matcher(out);
        assertTrue(line.find(), out);
        assertEquals(Long.parseLong(line.group(1)), parts, "replay of the log = the live figures");
        assertEquals(Long.parseLong(line.group(2)), passed);
        return ofReason;
    }

    @Test
    void aNoisyMeterWithReMeasuring_reReadsPartsNearALimit_andItsReplayGivesTheLiveBins() throws Exception {
        String out = demo("--scenario", "simulators/scenarios/harrowgate-mlcc-100n-noisy-meter.yaml", "--recipe", "mlcc-x7r-100n-remeasure",
                "--parts", "1500", "--rate", "300");
        java.util.regex.Matcher m = java.util.regex.Pattern.compile("re-measured near a limit: (\\d+) of (\\d+) parts").matcher(out);
        assertTrue(m.find(), out);
        assertTrue(Long.parseLong(m.group(1)) > 0, "parts near a limit were read again: " + m.group());
        replayEqualsLive(out, "mlcc-x7r-100n-remeasure", "in-grade");
    }

    @Test
    void aRecipeThatDoesNotSortTheScenariosPart_isRefusedNamingTheOnesThatDo() throws Exception {
        Process p = new ProcessBuilder("java", "-jar", Jar.path(), "demo", "--recipe", "resistor-prec-4k99", "--parts", "10", "--out", dir.toString())
                .redirectErrorStream(true).start();
        String out = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
        assertTrue(p.waitFor(2, TimeUnit.MINUTES));
        assertEquals(2, p.exitValue(), out);
        assertTrue(out.contains("--recipe resistor-prec-4k99") && out.contains("mlcc-x7r-100n"), out);
    }

    @Test
    void aTwoStepPlan_demoReadsEsrAfterCAndD_andItsLogReplaysToTheLiveFigures() throws Exception {
        String out = demo("--scenario", "simulators/scenarios/harrowgate-polymer-100u.yaml", "--parts", "800", "--rate", "200");
        assertTrue(out.contains("recipe polymer-cap-100u-esr") && out.contains("at 100.0 kHz"), "compensated at both steps' frequencies: " + out);
        java.util.regex.Matcher esr = java.util.regex.Pattern.compile("esr-high +(\\d+)").matcher(out);
        assertTrue(esr.find() && Long.parseLong(esr.group(1)) > 0, "the ESR step rejected parts: " + out);
        assertEquals(Long.parseLong(esr.group(1)), replayEqualsLive(out, "polymer-cap-100u-esr", "esr-high"));
    }
}
