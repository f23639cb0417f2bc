package net.zbin.io;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.node.ArrayNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import net.zbin.core.ChartDesign;
import net.zbin.core.MonitorSettings;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The drift charts' limits a line solved from its false-alarm budget, kept in {@code <state_dir>/chart-limits-<line>.json}
 * so that a restart takes them instead of solving again (the solve is the largest piece of arithmetic in a start: 0.1–0.3
 * s). A limit read back is taken only if it still meets its share of the budget ({@link ChartDesign#adopt}); a file that
 * is missing, unreadable or for other settings costs one solve, never a wrong limit. Up to {@link #KEPT} settings are
 * kept (the latest first).
 */
public final class ChartLimits {
    private static final Logger LOG = LoggerFactory.getLogger(ChartLimits.class);
    static final int KEPT = 16;

    private ChartLimits() {}

    public static Path file(Path stateDir, String line) { return stateDir.resolve("chart-limits-" + line + ".json"); }

    /** Takes the kept limits for these settings as their design when they still meet the budget; true when taken. */
    public static boolean recall(Path stateDir, String line, MonitorSettings s) {
        if (ChartDesign.known(s)) return true;
        Path f = file(stateDir, line);
        if (!Files.exists(f)) return false;
        String key = ChartDesign.key(s).toString();
        try {
            for (JsonNode e : Json.mapper().readTree(f.toFile()).path("designs"))
                if (e.path("settings").asText().equals(key)) {
                    if (ChartDesign.adopt(s, e.path("cusum_h").asDouble(Double.NaN), e.path("ewma_l").asDouble(Double.NaN)) != null) return true;
                    LOG.info("chart limits in {} no longer meet the false-alarm budget: designed again", f);
                    return false;
                }
        } catch (IOException | RuntimeException e) {
            LOG.info("chart limits {} unreadable, designed again: {}", f, e.toString());
        }
        return false;
    }

    /** Keeps the design's limits for these settings (atomically: temp file and rename), before those of other settings. */
    public static void keep(Path stateDir, String line, MonitorSettings s, ChartDesign d) {
        Path f = file(stateDir, line), tmp = f.resolveSibling(f.getFileName() + ".tmp");
        String key = ChartDesign.key(s).toString();
        ObjectNode root = Json.object();
        root.put("about", "drift chart limits solved from each setting's false-alarm budget; taken at start only if they still meet it");
        ArrayNode designs = root.putArray("designs");
        designs.addObject().put("settings", key).put("cusum_h", d.h()).put("ewma_l", d.limitL());
        try {
            if (Files.exists(f))
                for (JsonNode e : Json.mapper().readTree(f.toFile()).path("designs"))
                    if (designs.size() < KEPT && e.isObject() && !e.path("settings").asText().equals(key)) designs.add(e);
        } catch (IOException | RuntimeException e) {
            LOG.debug("earlier chart limits {} not kept: {}", f, e.toString());
        }
        try {
            Files.createDirectories(stateDir);
            Json.mapper().writerWithDefaultPrettyPrinter().writeValue(tmp.toFile(), root);
            Files.move(tmp, f, StandardCopyOption.REPLACE_EXISTING, StandardCopyOption.ATOMIC_MOVE);
        } catch (IOException | RuntimeException e) {
            LOG.warn("chart limits not kept in {}: {}", f, e.toString());
        }
    }
}
