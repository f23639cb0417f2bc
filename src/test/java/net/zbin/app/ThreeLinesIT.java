package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import net.zbin.sim.HandlerSim;
import net.zbin.sim.Scenario;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVRecord;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** Three daemons for three lines on one broker, each sorting a different part: no cross-talk. */
class ThreeLinesIT {
    static EmbeddedBroker broker;

    @BeforeAll
    static void up() throws Exception { broker = new EmbeddedBroker(Files.createTempDirectory("moquette3")); }

    @AfterAll
    static void down() { broker.close(); }

    @TempDir
    Path dir;

    @Test
    void threeLines_twoThousandPartsEach_noCrossTalk() throws Exception {
        String[][] lines = {{"l-mlcc", "mlcc-x7r-100n", null}, {"l-ind", "inductor-pwr-4u7", "simulators/scenarios/harrowgate-inductor-4u7.yaml"},
                {"l-res", "resistor-prec-4k99", "simulators/scenarios/harrowgate-resistor-4k99.yaml"}};
        List<LineRig> rigs = new ArrayList<>();
        List<Tap> taps = new ArrayList<>();
        ExecutorService pool = Executors.newFixedThreadPool(3);
        try {
            for (String[] l : lines) {
                Scenario sc = LineRig.quietMeter(l[2] == null ? Scenario.builtIn() : Scenario.read(Path.of(l[2])));
                Path d = Files.createDirectories(dir.resolve(l[0]));
                LineRig rig = new LineRig(d, l[0], broker.url(), sc, l[1], "");
                rig.compensate();
                rigs.add(rig);
                taps.add(new Tap(broker.url(), "zbin/" + l[0] + "/decision"));
            }
            List<Future<HandlerSim.Summary>> runs = new ArrayList<>();
            for (LineRig r : rigs) runs.add(pool.submit(() -> r.runHandler(2000, 150, 0, 0)));
            for (int i = 0; i < 3; i++) {
                HandlerSim.Summary s = runs.get(i).get();
                String line = lines[i][0], recipe = lines[i][1];
                assertEquals(0, s.missing(), line + " missing");
                assertEquals(0, s.duplicate(), () -> line + " duplicate: " + s.duplicateAnswers());
                assertEquals(0, s.contradictory(), line + " contradictory");
                List<Tap.Msg> seen = taps.get(i).await(m -> true, (int) s.triggers(), 20_000);
                for (Tap.Msg m : seen) assertEquals(recipe, m.json().path("recipe").asText(), line + " got a decision of another line: " + m.raw());
                assertEquals(s.triggers(), seen.size(), line + ": exactly its own decisions");
                rigs.get(i).close();
                long rows = 0;
                for (Path f : rigs.get(i).recordFiles()) {
                    try (var p = CSVFormat.DEFAULT.builder().setHeader().setSkipHeaderRecord(true).get().parse(Files.newBufferedReader(f))) {
                        for (CSVRecord r : p) {
                            assertEquals(line, r.get("line"));
                            assertEquals(recipe, r.get("recipe"));
                            rows++;
                        }
                    }
                }
                assertEquals(s.triggers(), rows, line + ": one record row per decision");
            }
        } finally {
            pool.shutdownNow();
            for (Tap t : taps) t.close();
            for (LineRig r : rigs) r.close();
        }
    }
}
