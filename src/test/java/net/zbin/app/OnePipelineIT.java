package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Random;
import java.util.TreeMap;
import net.zbin.io.Json;
import net.zbin.sim.PartModel;
import net.zbin.sim.Scenario;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The live line, {@code replay} and {@code tune} decide the same readings alike: one engine. Three lots through the
 * real daemon and a real broker — the second lot sits 3 % above the first (a new reel: no drift, a new baseline),
 * the third drifts up in its second half — then the record log replayed and tuned: the same bins and reasons, and the
 * same monitor alarms in the same order.
 */
class OnePipelineIT {
    @TempDir
    Path dir;

    /** Alarm codes the monitor raises from the decisions themselves (not from the clock or the link). */
    static final List<String> FROM_DECISIONS = List.of("value-drift", "loss-drift", "negative-r-rate", "open-residual",
            "short-residual", "reference-off", "compensation-offset");

    @Test
    void aMultiLotLog_replayedAndTuned_givesTheLiveBinsReasonsAndAlarms() throws Exception {
        Path recipes = dir.resolve("recipes");
        Files.createDirectories(recipes);
        // The shipped 100 nF recipe with a short learning phase, so that three small lots each get a chart, and re-measuring
        // near a limit (U 0.3 % of which 0.25 % repeatability; up to 3 readings within 0.4 points of a limit).
        String text = Files.readString(Path.of("config/recipes/mlcc-x7r-100n.yaml"));
        assertTrue(text.contains("  uncertainty_pct: 0.3"), "the shipped recipe states U 0.3 %");
        Files.writeString(recipes.resolve("pipe-x7r-100n.yaml"), text.replace("recipe: mlcc-x7r-100n", "recipe: pipe-x7r-100n")
                .replace("speed: medium", "speed: fast").replace("  uncertainty_pct: 0.3", "  repeatability_pct: 0.25\n  uncertainty_pct: 0.3")
                + "monitor: {learn_parts: 150}\nremeasure: {max_readings: 3, near_pct: 0.4}\n");
        List<String[]> liveAlarms = new ArrayList<>();
        Map<String, Long> liveBins = new TreeMap<>();
        try (MosquittoProcess broker = new MosquittoProcess(dir, "");
             LineRig rig = new LineRig(dir, "pipe", broker.url(), LineRig.quietMeter(Scenario.builtIn()), "pipe-x7r-100n", "");
             Tap tap = new Tap(broker.url(), "zbin/pipe/decision", "zbin/pipe/alarm")) {
            Random rnd = new Random(20261202); // invented lots: 0.5 % spread in C, D about 0.010
            String[] lots = {"PL-A", "PL-B", "PL-C"};
            double[] offsetPct = {0, 3, 0};
            int perLot = 400, seq = 0, remeasured = 0;
            for (int l = 0; l < lots.length; l++) {
                for (int i = 0; i < perLot; i++, seq++) {
                    double drift = l == 2 && i >= perLot / 2 ? 1.5 * (i - perLot / 2) / (perLot / 2.0) : 0; // up to +1.5 % in lot C
                    // now and then a part of another grade, out of tolerance, or too lossy: every bin the recipe has
                    double odd = seq % 53 == 7 ? 7 : seq % 97 == 11 ? -25 : seq % 89 == 5 ? 30 : 0;
                    boolean nearJ = l < 2 && seq % 13 == 4; // (lots A and B) right at J's guarded limit (4.685 % with one reading, 4.769 % with three)
                    double c = 100e-9 * (1 + (nearJ ? 4.74 : offsetPct[l] + drift + odd + 0.5 * rnd.nextGaussian()) / 100);
                    double tanD = seq % 71 == 3 ? 0.03 : 0.010 + 0.0005 * rnd.nextGaussian();
                    rig.contacts.load(new PartModel.Capacitor(c, 0.02, 0, tanD), 0);
                    int before = tap.msgs.size();
                    tap.publish("zbin/pipe/trigger", "{\"seq\": " + seq + ", \"part\": \"P" + seq + "\", \"lot\": \"" + lots[l] + "\"}");
                    final int s = seq;
                    JsonNode d = tap.awaitAfter(before, m -> m.topic().endsWith("/decision") && m.json().path("seq").asLong() == s, 30_000).json();
                    count(liveBins, d);
                    if (d.path("readings").asInt() > 1) remeasured++;
                }
            }
            tap.await(m -> m.topic().endsWith("/decision") && m.json().path("seq").asLong() == lots.length * perLot - 1, 1, 30_000);
            for (Tap.Msg m : tap.msgs)
                if (m.topic().endsWith("/alarm") && FROM_DECISIONS.contains(m.json().path("code").asText()))
                    liveAlarms.add(new String[] {m.json().path("code").asText(), Boolean.toString(m.json().path("active").asBoolean())});
            rig.daemon.close();
            assertTrue(remeasured >= 20, "parts at J's limit were measured again: " + remeasured);
            List<Path> logs = rig.recordFiles();
            assertEquals(1, logs.size(), "one record file: " + logs);
            Path log = logs.get(0);
            Path recipe = recipes.resolve("pipe-x7r-100n.yaml");

            Cli replay = Cli.run("replay", "--recipe", recipe.toString(), "--in", log.toString(), "--json", "--quiet",
                    "--line-config", rig.cfg.file().toString());
            assertEquals(0, replay.exit(), replay.err());
            JsonNode r = Json.mapper().readTree(replay.out());
            List<String[]> replayed = new ArrayList<>();
            for (JsonNode p : r.path("alarm_points"))
                if (FROM_DECISIONS.contains(p.path("code").asText())) replayed.add(new String[] {p.path("code").asText(), Boolean.toString(p.path("active").asBoolean())});
            System.out.println("re-measured " + remeasured + "; live alarms " + text(liveAlarms) + "; replayed " + text(replayed) + "; bins " + liveBins);
            assertTrue(liveAlarms.stream().anyMatch(a -> a[0].equals("value-drift") && a[1].equals("true")),
                    "the drifting lot raised value-drift on the live line: " + text(liveAlarms));
            assertEquals(text(liveAlarms), text(replayed), "replay raises and clears the live line's alarms, in order");
            assertEquals(liveBins, reasonsByBin(r), "replay gives the live bins and reasons");

            // tune at the recipe's own guard band (one setting, the fast counting path) gives the same bins and reasons
            Cli tune = Cli.run("tune", "--recipe", recipe.toString(), "--in", log.toString(), "--json", "--quiet",
                    "--vary", "guard=0.3", "--line-config", rig.cfg.file().toString());
            assertEquals(0, tune.exit(), tune.err());
            JsonNode t = Json.mapper().readTree(tune.out()).path("settings").get(0);
            assertEquals(liveBins, reasonsByBin(t), "tune at the recipe's setting gives the live bins and reasons");
        }
    }

    /** A tally's final bins ("bin grade" → count), reasons and retest reasons, as one comparable map. */
    static Map<String, Long> reasonsByBin(JsonNode tally) {
        Map<String, Long> out = new TreeMap<>();
        for (JsonNode b : tally.path("bins")) out.merge("bin " + b.path("bin").asInt() + " " + b.path("grade").asText(), b.path("count").asLong(), Long::sum);
        tally.path("reasons").fields().forEachRemaining(e -> out.merge("reason " + e.getKey(), e.getValue().asLong(), Long::sum));
        tally.path("retest_reasons").fields().forEachRemaining(e -> out.merge("retest " + e.getKey(), e.getValue().asLong(), Long::sum));
        return out;
    }

    /** The same figures from the decisions the handler got. */
    static void count(Map<String, Long> out, JsonNode d) {
        if (d.path("verdict").asText().equals("retest")) {
            out.merge("retest " + d.path("reason").asText(), 1L, Long::sum);
            return;
        }
        out.merge("bin " + d.path("bin").asInt() + " " + d.path("grade").asText(), 1L, Long::sum);
        out.merge("reason " + d.path("reason").asText(), 1L, Long::sum);
    }

    static String text(List<String[]> alarms) {
        StringBuilder b = new StringBuilder();
        for (String[] a : alarms) b.append(a[0]).append(a[1].equals("true") ? "↑ " : "↓ ");
        return b.toString().trim();
    }
}
