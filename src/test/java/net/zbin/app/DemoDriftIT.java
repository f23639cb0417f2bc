package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Set;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The demo on the drifting-fixture scenario: the alarm rises during the run, and a replay of the log sees it too. */
class DemoDriftIT {
    @TempDir
    Path dir;

    @Test
    void driftingStray_raisesTheCompensationAlarmDuringTheRun_andReplayFindsTheSameAlarmPoints() throws Exception {
        Path scenario = FastDriftScenario.write(Files.createDirectories(dir.resolve("scenario")));
        Process p = new ProcessBuilder("java", "-jar", Jar.path(), "demo", "--scenario", scenario.toString(), "--time-scale", "0",
                "--parts", "12000", "--rate", "500", "--out", dir.resolve("demo").toString()).redirectErrorStream(true).start();
        String out = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
        assertTrue(p.waitFor(5, TimeUnit.MINUTES));
        assertEquals(0, p.exitValue(), out);
        assertTrue(out.contains("compensation-offset raised") && out.contains("additive offset"), out);

        // The monitor's own alarms, in order, as the live line raised and cleared them …
        Set<String> monitorCodes = Set.of("value-drift", "loss-drift", "compensation-offset", "open-residual", "short-residual",
                "reference-off", "negative-r-rate");
        ObjectMapper m = new ObjectMapper();
        List<String> live = new ArrayList<>();
        for (String line : Files.readAllLines(dir.resolve("demo/state/alarms-demo.jsonl"))) {
            JsonNode a = m.readTree(line);
            if (monitorCodes.contains(a.path("code").asText())) live.add(a.path("code").asText() + (a.path("active").asBoolean() ? "+" : "-"));
        }
        // … and as a replay of the record log finds them.
        java.io.File[] logs = dir.resolve("demo/records").toFile().listFiles();
        if (logs.length != 1) return; // the run crossed midnight UTC: the lot is split over two files
        Cli replay = Cli.run("replay", "--recipe", dir.resolve("demo/recipes/mlcc-c0g-100p.yaml").toString(), "--in", logs[0].toString(), "--json");
        assertEquals(0, replay.exit(), replay.err());
        List<String> replayed = new ArrayList<>();
        for (JsonNode a : m.readTree(replay.out()).path("alarm_points"))
            if (monitorCodes.contains(a.path("code").asText())) replayed.add(a.path("code").asText() + (a.path("active").asBoolean() ? "+" : "-"));
        assertTrue(live.contains("compensation-offset+"), live.toString());
        assertEquals(live, replayed, "replay would have raised the same alarms, in the same order");
    }
}
