package net.zbin.app.daemon;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Set;
import java.util.stream.Collectors;
import net.zbin.app.TestLine;
import net.zbin.io.LineConfig;
import net.zbin.io.LineConfigLoader;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The warm-up runs the line's own trigger path on invented parts and leaves nothing of them behind. */
class WarmupTest {
    @TempDir
    Path dir;

    LineConfig line(String recipe) throws Exception {
        Path cfgFile = TestLine.write(dir, "wu", "tcp://127.0.0.1:1", 1, "");
        Files.writeString(cfgFile, Files.readString(cfgFile).replace("active: mlcc-x7r-100n", "active: " + recipe));
        Path recipes = dir.resolve("recipes");
        Files.createDirectories(recipes);
        Files.writeString(recipes.resolve(recipe + ".yaml"), Files.readString(Path.of("config/recipes/" + recipe + ".yaml")));
        return LineConfigLoader.load(cfgFile);
    }

    static Set<Path> scratchFolders() throws Exception {
        try (var s = Files.list(Path.of(System.getProperty("java.io.tmpdir")))) {
            return s.filter(p -> p.getFileName().toString().startsWith("zbin-warm-up-")).collect(Collectors.toSet());
        }
    }

    @Test
    void warmup_runsInventedLotsThroughThePath_andLeavesNoRecordAlarmOrFolder() throws Exception {
        for (String recipe : new String[] {"mlcc-x7r-100n", "polymer-cap-100u-esr", "mlcc-x7r-100n-remeasure"}) {
            LineConfig cfg = line(recipe);
            Set<Path> before = scratchFolders();
            long n = Warmup.run(cfg, new LineSetup(cfg), 3 * Warmup.LOT_PARTS + 5, 60_000);
            assertEquals(3 * Warmup.LOT_PARTS + 5, n, recipe + ": every trigger asked for ran (lot changes included)");
            assertEquals(before, scratchFolders(), recipe + ": the scratch record folder is removed");
            assertFalse(Files.exists(cfg.records().dir()) && Files.list(cfg.records().dir()).findAny().isPresent(),
                    recipe + ": nothing written among the line's records");
            try (var s = Files.list(cfg.stateDir())) {
                assertTrue(s.noneMatch(p -> p.getFileName().toString().startsWith("alarms-")), recipe + ": no alarm history of invented parts");
            } catch (java.nio.file.NoSuchFileException none) {
                // no state folder at all: nothing written there either
            }
        }
    }

    @Test
    void warmup_writesNoWarningIntoTheLinesLog() throws Exception {
        // invented parts must not read as a handler's mistakes (a reused seq, a retest of nothing) in the line's own log
        var root = (ch.qos.logback.classic.Logger) org.slf4j.LoggerFactory.getLogger(org.slf4j.Logger.ROOT_LOGGER_NAME);
        var heard = new ch.qos.logback.core.read.ListAppender<ch.qos.logback.classic.spi.ILoggingEvent>();
        heard.start();
        root.addAppender(heard);
        try {
            for (String recipe : new String[] {"mlcc-x7r-100n", "polymer-cap-100u-esr", "mlcc-x7r-100n-remeasure"}) {
                LineConfig cfg = line(recipe);
                Warmup.run(cfg, new LineSetup(cfg), 6 * Warmup.LOT_PARTS, 60_000);
            }
        } finally {
            root.detachAppender(heard);
        }
        var warnings = heard.list.stream().filter(e -> e.getLevel().isGreaterOrEqual(ch.qos.logback.classic.Level.WARN))
                .map(ch.qos.logback.classic.spi.ILoggingEvent::getFormattedMessage).toList();
        assertEquals(java.util.List.of(), warnings, "warnings logged by the warm-up");
    }

    @Test
    void warmup_stopsAtItsTimeBound_notAtItsRoundCount() throws Exception {
        LineConfig cfg = line("mlcc-x7r-100n");
        long n = Warmup.run(cfg, new LineSetup(cfg), 1_000_000, 1);
        // a first lot and the next one's start always run; then the clock is read every 32 triggers, and 100 000 of them
        // take far longer than the 1 ms allowed on any machine
        assertEquals(0, n % 32, "stops only where it reads the clock: " + n);
        assertTrue(n > Warmup.LOT_PARTS && n <= 100_000, "ran " + n + " of the million asked for");
    }

    @Test
    void inventedTriggers_comeInEveryShapeAHandlerSends() throws Exception {
        int noPart = 0, noLot = 0, kind = 0, retest = 0, spaced = 0, compact = 0;
        for (int i = 0; i < 2 * Warmup.LOT_PARTS; i++) {
            byte[] b = Warmup.trigger(i);
            net.zbin.core.Trigger t = net.zbin.io.mqtt.TriggerCodec.decode(b); // each one is a valid trigger
            String text = new String(b, java.nio.charset.StandardCharsets.UTF_8);
            if (t.part().isEmpty()) noPart++;
            if (t.lot().isEmpty()) noLot++;
            if (text.contains("\"kind\"")) kind++;
            if (text.contains("\"retest_of\"")) retest++;
            if (text.contains("\n")) spaced++;
            else compact++;
        }
        assertTrue(noPart > 0 && noLot > 0 && kind > 0 && retest > 0 && spaced > 0 && compact > 0,
                "without part " + noPart + ", without lot " + noLot + ", with kind " + kind + ", retests " + retest + ", pretty " + spaced + ", compact " + compact);
    }
}
