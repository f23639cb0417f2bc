package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Random;
import net.zbin.core.Recipe;
import net.zbin.core.RecordedReading;
import net.zbin.core.Sweep;
import net.zbin.core.Tuner;
import net.zbin.io.ReadingSource;
import net.zbin.io.RecipeLoader;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** {@code zbin tune}: every setting's counts equal a brute-force replay of that setting, exactly. */
class TuneTest {
    @TempDir
    Path dir;

    static List<RecordedReading> rows(Path f) throws Exception {
        List<RecordedReading> out = new ArrayList<>();
        try (ReadingSource s = ReadingSource.open(f, b -> { })) {
            RecordedReading r;
            while ((r = s.next()) != null) out.add(r);
        }
        return out;
    }

    /** A lot written by {@code zbin sim lot} from a shipped scenario, read back as replay reads it. */
    List<RecordedReading> simulatedLot(String scenario, int parts) throws Exception {
        Path lot = dir.resolve(scenario + "-" + parts + ".csv");
        Cli w = Cli.run("sim", "lot", "--parts", Integer.toString(parts), "--out", lot.toString(), "--scenario",
                "simulators/scenarios/" + scenario + ".yaml");
        assertEquals(0, w.exit(), w.err());
        return rows(lot);
    }

    static void assertLikeReplays(Recipe base, List<RecordedReading> rows, List<Sweep> sweeps) {
        Tuner tuner = new Tuner(base, sweeps, 0.3);
        rows.forEach(tuner::add);
        for (Tuner.Result r : tuner.results()) {
            if (!r.valid()) continue;
            Recipe set = Sweep.applyAll(base, sweeps, r.values());
            assertEquals(Tuner.replay(set, rows).snapshot(), r.tally(), r.label());
        }
    }

    @Test
    void randomLimitAndGuardSettings_countExactlyAsReplaysOfThem_concentric() throws Exception {
        Recipe mlcc = RecipeLoader.load(Path.of("config/recipes/mlcc-x7r-100n.yaml"));
        List<RecordedReading> rows = rows(Path.of("simulators/lots/lot-mlcc-100n.csv"));
        Random rnd = new Random(2026);
        for (int k = 0; k < 30; k++) {
            double j = 1 + rnd.nextInt(80) / 10.0, kk = j + 0.5 + rnd.nextInt(60) / 10.0;
            List<Sweep> sweeps = List.of(Sweep.parse("grade.J=" + j + "," + (j + 0.37), mlcc.partType()),
                    Sweep.parse(rnd.nextBoolean() ? "grade.K=" + kk : "guard=" + rnd.nextInt(40) / 100.0 + "," + rnd.nextInt(90) / 100.0, mlcc.partType()));
            assertLikeReplays(mlcc, rows, sweeps);
        }
        // Edges on purpose: a limit exactly at a recorded deviation.
        assertLikeReplays(mlcc, rows, List.of(Sweep.parse("guard=0", mlcc.partType()), Sweep.parse("grade.J=5,4.2,3", mlcc.partType())));
    }

    @Test
    void ladderSettings_countExactlyAsReplays() throws Exception {
        Recipe ind = RecipeLoader.load(Path.of("config/recipes/inductor-pwr-4u7.yaml"));
        List<RecordedReading> rows = simulatedLot("harrowgate-inductor-4u7", 3000);
        assertLikeReplays(ind, rows, List.of(Sweep.parse("guard=0:1:0.25", ind.partType())));
        assertLikeReplays(ind, rows, List.of(Sweep.parse("grade.N.low=-9:-5:0.5", ind.partType()), Sweep.parse("grade.L-.high=-9,-7,-5", ind.partType())));
    }

    @Test
    void gateAndNominalSettings_countExactlyAsReplays() throws Exception {
        Recipe mlcc = RecipeLoader.load(Path.of("config/recipes/mlcc-x7r-100n.yaml"));
        List<RecordedReading> rows = rows(Path.of("simulators/lots/lot-mlcc-100n.csv"));
        assertLikeReplays(mlcc, rows, List.of(Sweep.parse("d_max=0.015:0.035:0.0025", mlcc.partType())));
        assertLikeReplays(mlcc, rows, List.of(Sweep.parse("q_min=20:60:5", mlcc.partType())));
        assertLikeReplays(mlcc, rows, List.of(Sweep.parse("esr_max=10:40:2.5", mlcc.partType())));
        assertLikeReplays(mlcc, rows, List.of(Sweep.parse("d_max=0.02,0.03", mlcc.partType()), Sweep.parse("grade.J=4,5", mlcc.partType())));
        assertLikeReplays(mlcc, rows, List.of(Sweep.parse("nominal=98n:102n:1n", mlcc.partType()), Sweep.parse("grade.J=4,5", mlcc.partType())));
    }

    @Test
    void theCommand_printsATable_json_csv_andRecommendsForATarget() throws Exception {
        String recipe = "config/recipes/mlcc-x7r-100n.yaml", lot = "simulators/lots/lot-mlcc-100n.csv";
        Path csv = dir.resolve("t.csv");
        Cli c = Cli.run("tune", "--recipe", recipe, "--in", lot, "--vary", "guard=0:1:0.25", "--target-false-accept", "0.05", "--csv", csv.toString());
        assertEquals(0, c.exit(), c.err());
        assertTrue(c.out().contains("guard=0.5") && c.out().contains("recommended: "), c.out());
        assertEquals(6, java.nio.file.Files.readAllLines(csv).size(), "header and five settings");
        JsonNode j = new ObjectMapper().readTree(Cli.run("tune", "--recipe", recipe, "--in", lot, "--vary", "guard=0:1:0.25", "--json").out());
        assertEquals(5, j.path("settings").size());
        JsonNode last = j.path("settings").get(4);
        assertTrue(last.path("false_accept_pct").asDouble() <= j.path("settings").get(0).path("false_accept_pct").asDouble(),
                "a wider guard band never raises the estimated false accepts");
        Cli bad = Cli.run("tune", "--recipe", recipe, "--in", lot, "--vary", "grade.J=7:3:1");
        assertEquals(2, bad.exit());
        assertTrue(bad.err().contains("FROM must not be above TO"), bad.err());
        Cli unknown = Cli.run("tune", "--recipe", recipe, "--in", lot, "--vary", "colour=red");
        assertEquals(2, unknown.exit());
        assertTrue(unknown.err().contains("QUANTITY=FROM:TO:STEP"), unknown.err());
    }

    /** The recipe file with its nominal line rewritten, as an engineer would edit it, loaded as replay would load it. */
    Recipe edited(Path file, String from, String to) throws Exception {
        String text = java.nio.file.Files.readString(file);
        assertTrue(text.contains(from), from);
        Path f = dir.resolve("edited-" + to.replaceAll("[^A-Za-z0-9.]", "_") + ".yaml");
        java.nio.file.Files.writeString(f, text.replace(from, to));
        return RecipeLoader.load(f);
    }

    @Test
    void nominalSweep_onLettersAndValues_isAReplayOfTheEditedFile() throws Exception {
        Path file = Path.of("config/recipes/mlcc-c0g-4p7.yaml");
        Recipe base = RecipeLoader.load(file);
        List<RecordedReading> rows = simulatedLot("harrowgate-c0g-4p7", 4000);
        Sweep nominal = Sweep.parse("nominal=4.5p:5.2p:0.1p", base.partType());
        Tuner tuner = new Tuner(base, List.of(nominal), 0.3);
        rows.forEach(tuner::add);
        int compared = 0;
        for (Tuner.Result r : tuner.results()) {
            String to = "nominal: " + net.zbin.core.SiValue.compact(r.values().get(0)) + "\n";
            assertTrue(r.label().equals("nominal=" + net.zbin.core.SiValue.compact(r.values().get(0))), "labelled in SI: " + r.label());
            Recipe file2;
            try {
                file2 = edited(file, "nominal: 4.7p\n", to);
            } catch (net.zbin.io.ConfigException e) {
                assertTrue(!r.valid(), r.label() + " is refused by the file too: " + e.getMessage());
                continue;
            }
            assertTrue(r.valid(), r.label() + ": " + r.problem());
            assertEquals(Tuner.replay(file2, rows).snapshot(), r.tally(), r.label());
            compared++;
        }
        assertTrue(compared >= 6, "most settings compared: " + compared);
    }

    @Test
    void twoSweeps_areValidatedTogether_inEitherOrder() throws Exception {
        Recipe ind = RecipeLoader.load(Path.of("config/recipes/inductor-pwr-4u7.yaml"));
        List<RecordedReading> rows = simulatedLot("harrowgate-inductor-4u7", 2000);
        // Ladder grades must meet: moving N's low edge alone leaves a gap or an overlap, moving both inner edges together is valid.
        Sweep a = Sweep.parse("grade.N.low=-9,-5", ind.partType()), b = Sweep.parse("grade.L-.high=-9,-5", ind.partType());
        Tuner ab = new Tuner(ind, List.of(a, b), 0.3), ba = new Tuner(ind, List.of(b, a), 0.3);
        rows.forEach(ab::add);
        rows.forEach(ba::add);
        for (Tuner.Result x : ab.results()) {
            Tuner.Result y = ba.results().stream().filter(r -> r.values().get(0).equals(x.values().get(1)) && r.values().get(1).equals(x.values().get(0)))
                    .findFirst().orElseThrow();
            assertEquals(x.values().get(0).equals(x.values().get(1)), x.valid(), x.label() + ": " + x.problem());
            assertEquals(x.valid(), y.valid(), "the order of the sweeps does not change the verdict: " + x.label() + " / " + y.label());
            if (x.valid()) {
                assertEquals(x.tally(), y.tally());
                assertEquals(Tuner.replay(Sweep.applyAll(ind, List.of(a, b), x.values()), rows).snapshot(), x.tally());
            }
        }
    }

    @Test
    void usageMistakes_exit2_withTheNameOfWhatIsWrong() throws Exception {
        String recipe = "config/recipes/mlcc-x7r-100n.yaml", lot = "simulators/lots/lot-mlcc-100n.csv";
        Cli typo = Cli.run("tune", "--recipe", recipe, "--in", lot, "--vary", "grade.X=1,2");
        assertEquals(2, typo.exit(), typo.out());
        assertTrue(typo.err().contains("no grade 'X'") && typo.err().contains("J, K, M"), typo.err());
        Cli negative = Cli.run("tune", "--recipe", recipe, "--in", lot, "--vary", "guard=0,1", "--target-false-accept", "-1");
        assertEquals(2, negative.exit());
        assertTrue(negative.err().contains("--target-false-accept"), negative.err());
        Cli pct = Cli.run("tune", "--recipe", recipe, "--in", lot, "--vary", "guard=0,1", "--target-false-accept", "0.05%");
        assertEquals(0, pct.exit(), pct.err());
        assertTrue(pct.out().contains("target ≤ 0.05000 %"), "0.05% is 0.05 %, not 5 %: " + pct.out());
        Cli gate = Cli.run("tune", "--recipe", recipe, "--in", lot, "--vary", "d_max=0.02,0.03", "--target-false-accept", "0.01");
        assertEquals(2, gate.exit());
        assertTrue(gate.err().contains("cannot be met by sweeping a gate"), gate.err());
        Path pctGuard = dir.resolve("pct-guard.yaml");
        java.nio.file.Files.writeString(pctGuard, java.nio.file.Files.readString(Path.of(recipe)).replaceAll("uncertainty_pct: [0-9.]+", "pct: 0.3"));
        Cli noU = Cli.run("tune", "--recipe", pctGuard.toString(), "--in", lot, "--vary", "grade.J=4,5");
        assertEquals(2, noU.exit(), noU.out());
        assertTrue(noU.err().contains("--uncertainty-pct") && noU.err().contains("guard_band.pct") && !noU.err().contains("NaN"), noU.err());
        Cli badValue = Cli.run("tune", "--recipe", recipe, "--in", lot, "--vary", "guard=0,1", "--grade-value", "Q=2");
        assertEquals(2, badValue.exit());
        assertTrue(badValue.err().contains("no grade 'Q'"), badValue.err());
    }

    @Test
    void gradeValues_weighTheRecommendation_byWhatTheGradesAreWorth() throws Exception {
        String recipe = "config/recipes/mlcc-x7r-100n.yaml", lot = "simulators/lots/lot-mlcc-100n.csv";
        // Every guard setting passes the same parts (the M grade is wide), so plain yield cannot choose; with J worth
        // three times M, the narrowest guard — which keeps the most parts in J — is worth most.
        JsonNode plain = new ObjectMapper().readTree(Cli.run("tune", "--recipe", recipe, "--in", lot, "--vary", "guard=0.25:1:0.25",
                "--target-false-accept", "1", "--json").out());
        JsonNode weighted = new ObjectMapper().readTree(Cli.run("tune", "--recipe", recipe, "--in", lot, "--vary", "guard=0.25:1:0.25",
                "--target-false-accept", "1", "--grade-value", "J=3", "--grade-value", "K=2", "--json").out());
        assertEquals("guard=0.25", weighted.path("recommended").asText(), weighted.toPrettyString());
        assertTrue(weighted.path("settings").get(0).path("value_pct").asDouble() > weighted.path("settings").get(3).path("value_pct").asDouble());
        assertTrue(plain.path("risk_model").path("process_sigma_pct").asDouble() > 0, plain.toPrettyString());
    }

    @Test
    void theSameSetting_hasTheSameRisk_onEveryPath() throws Exception {
        // The recipe as it stands, reached by a gate sweep (row by row), a guard sweep (binned) and a nominal sweep (replayed).
        Recipe mlcc = RecipeLoader.load(Path.of("config/recipes/mlcc-x7r-100n.yaml"));
        List<RecordedReading> rows = rows(Path.of("simulators/lots/lot-mlcc-100n.csv"));
        double[] fa = new double[3], fr = new double[3];
        String[] specs = {"d_max=0.025", "guard=0.3", "nominal=100n"};
        for (int i = 0; i < 3; i++) {
            Tuner t = new Tuner(mlcc, List.of(Sweep.parse(specs[i], mlcc.partType())), 0.3);
            rows.forEach(t::add);
            Tuner.Result r = t.results().get(0);
            assertEquals(Tuner.replay(mlcc, rows).snapshot(), r.tally(), specs[i]);
            fa[i] = r.falseAcceptPct();
            fr[i] = r.falseRejectPct();
        }
        for (int i = 1; i < 3; i++) {
            assertEquals(fa[0], fa[i], 0.01 * fa[0] + 1e-9, "false accept, " + specs[i] + " vs " + specs[0]);
            assertEquals(fr[0], fr[i], 0.01 * fr[0] + 1e-9, "false reject, " + specs[i] + " vs " + specs[0]);
        }
    }

    @Test
    void aLotWithNoFinishedPart_showsDashesInTheTable_neverNaN() throws Exception {
        // one non-finite reading: a retest, no part finished, so no yield and no risk for any setting
        Path none = dir.resolve("none.csv"), html = dir.resolve("none.html");
        java.nio.file.Files.writeString(none, "freq_hz,r_ohm,x_ohm\n1000,NaN,-1591.5\n");
        Cli c = Cli.run("tune", "--recipe", "config/recipes/mlcc-x7r-100n.yaml", "--in", none.toString(), "--vary", "guard=0,0.5",
                "--report", html.toString());
        assertEquals(0, c.exit(), c.err());
        assertTrue(c.out().lines().anyMatch(l -> l.trim().startsWith("guard=0.5") && l.contains(" – ")), c.out());
        assertTrue(!c.out().contains("NaN") && !java.nio.file.Files.readString(html).contains("NaN"), c.out());
    }

    @Test
    void aLotOfOneGradedPart_hasNoRiskFigures_onEveryPath_andNoRecommendation() throws Exception {
        // one part has no spread: a risk computed for it would come from a process the lot never showed
        Recipe mlcc = RecipeLoader.load(Path.of("config/recipes/mlcc-x7r-100n.yaml"));
        Path one = dir.resolve("one.csv");
        java.nio.file.Files.writeString(one, "freq_hz,r_ohm,x_ohm\n1000,15.9,-1591.5\n");
        List<RecordedReading> rows = rows(one);
        // the three ways tune counts a setting: by value bands (guard), along a gate (d_max), by replaying it (nominal)
        for (String sweep : List.of("guard=0,0.5", "d_max=0.02,0.05", "nominal=99n,100n")) {
            Tuner tuner = new Tuner(mlcc, List.of(Sweep.parse(sweep, mlcc.partType())), 0.5);
            rows.forEach(tuner::add);
            for (Tuner.Result r : tuner.results()) {
                assertEquals(1, r.tally().parts(), sweep);
                assertTrue(Double.isNaN(r.falseAcceptPct()) && Double.isNaN(r.falseRejectPct()), sweep + ": " + r);
            }
            assertTrue(!tuner.model().estimated() && tuner.model().parts() == 1, sweep + ": " + tuner.model());
        }
        Cli c = Cli.run("tune", "--recipe", "config/recipes/mlcc-x7r-100n.yaml", "--in", one.toString(), "--vary", "guard=0,0.5",
                "--uncertainty-pct", "0.5", "--target-false-accept", "0.01");
        assertEquals(0, c.exit(), c.err());
        assertTrue(c.out().contains("No risk figures: no process estimate: the lot has 1 part graded by value"), c.out());
        assertTrue(c.out().contains("no recommendation: no risk figures"), c.out());
        assertTrue(!c.out().contains("N(") && !c.out().contains("NaN"), c.out());
        Cli j = Cli.run("tune", "--recipe", "config/recipes/mlcc-x7r-100n.yaml", "--in", one.toString(), "--vary", "guard=0,0.5",
                "--uncertainty-pct", "0.5", "--json");
        assertEquals(0, j.exit(), j.err());
        var n = net.zbin.io.Json.mapper().readTree(j.out());
        assertEquals(false, n.path("risk_model").path("process_estimated").asBoolean(true), j.out());
        assertEquals(1, n.path("risk_model").path("graded_parts").asInt(), j.out());
        assertTrue(n.path("settings").get(0).path("false_accept_pct").isNull(), j.out());
        // a recipe that splits U: no re-measuring estimate either (it would simulate the process the lot does not have)
        Cli g = Cli.run("tune", "--recipe", "config/recipes/mlcc-x7r-100n-remeasure.yaml", "--in", one.toString(), "--vary", "guard=0,0.5", "--json");
        assertEquals(0, g.exit(), g.err());
        assertTrue(net.zbin.io.Json.mapper().readTree(g.out()).path("remeasure_gain").isMissingNode(), g.out());
        // two parts are a lot with a spread: figures again
        java.nio.file.Files.writeString(one, "freq_hz,r_ohm,x_ohm\n1000,15.9,-1591.5\n1000,15.9,-1560.0\n");
        Tuner two = new Tuner(mlcc, List.of(Sweep.parse("guard=0,0.5", mlcc.partType())), 0.5);
        rows(one).forEach(two::add);
        assertTrue(two.model().estimated() && two.model().parts() == 2, two.model().toString());
        assertTrue(Double.isFinite(two.results().get(0).falseAcceptPct()), two.results().toString());
        Cli g2 = Cli.run("tune", "--recipe", "config/recipes/mlcc-x7r-100n-remeasure.yaml", "--in", one.toString(), "--vary", "guard=0,0.5", "--json");
        assertEquals(0, g2.exit(), g2.err());
        assertTrue(net.zbin.io.Json.mapper().readTree(g2.out()).path("remeasure_gain").isArray(), g2.out());
    }
}
