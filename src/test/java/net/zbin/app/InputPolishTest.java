package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import java.io.IOException;
import java.net.InetAddress;
import java.net.ServerSocket;
import java.nio.file.Files;
import java.nio.file.Path;
import net.zbin.io.Json;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** Bad input of every kind gets a clear exit-2 message naming what is wrong; numbers read and print as they mean. */
class InputPolishTest {
    @TempDir
    Path dir;

    @Test
    void aUnitThatDoesNotFitTheOption_isRefused() {
        Cli c = Cli.run("calc", "--freq", "1k", "--r", "1kHz", "--x", "5");
        assertEquals(2, c.exit());
        assertTrue(c.err().contains("--r") && c.err().contains("frequency"), c.err());
        assertEquals(2, Cli.run("calc", "--freq", "100kOhm", "--r", "1", "--x", "5").exit());
        assertEquals(0, Cli.run("calc", "--freq", "1kHz", "--r", "10mΩ", "--x", "-5ohm").exit());
    }

    @Test
    void minusZeroAndZero_areOneReading_andInfinitiesPrintAsInfinity() throws Exception {
        Cli a = Cli.run("calc", "--freq", "1k", "--r", "-0", "--x", "-1000", "--json");
        Cli b = Cli.run("calc", "--freq", "1k", "--r", "0", "--x", "-1000", "--json");
        assertEquals(b.out(), a.out());
        JsonNode n = Json.mapper().readTree(a.out());
        assertTrue(n.get("q").isNull() && n.get("rp_ohm").isNull(), "JSON: an infinite quantity is null");
        Cli text = Cli.run("calc", "--freq", "1k", "--r", "0", "--x", "-1000");
        assertTrue(text.out().contains("Q  = ∞") && text.out().contains("Rp = ∞ Ω"), text.out());
        Cli resistor = Cli.run("calc", "--freq", "1k", "--r", "100", "--x", "0");
        assertTrue(resistor.out().contains("D   = ∞"), resistor.out());
        assertFalse(resistor.out().contains("Infinity"), resistor.out());
    }

    @Test
    void calcWithARecipe_showsTheRecipesResolvedModelAndWhy() {
        Path mlcc = Path.of("config/recipes/mlcc-x7r-100n.yaml");
        Cli c = Cli.run("calc", "--freq", "1k", "--r", "0.8", "--x", "-1591", "--recipe", mlcc.toString());
        assertEquals(0, c.exit(), c.err());
        assertTrue(c.out().contains("model: series (the recipe grades Cs, a series parameter"), c.out());
    }

    @Test
    void yamlErrors_giveTheParsersLine_andDuplicateKeysAreRefused() throws IOException {
        Path bad = dir.resolve("bad.yaml");
        Files.writeString(bad, "recipe: x\npart: capacitor\nnominal: 100n\n  test: 5\n");
        Cli c = Cli.run("check", "--recipe", bad.toString());
        assertEquals(2, c.exit());
        assertTrue(c.err().contains("line 4:"), c.err());
        Path dup = dir.resolve("dup.yaml");
        Files.writeString(dup, "recipe: x\npart: capacitor\nnominal: 100n\nnominal: 220n\n");
        Cli d = Cli.run("check", "--recipe", dup.toString());
        assertEquals(2, d.exit());
        assertTrue(d.err().contains("'nominal' is given twice"), d.err());
    }

    @Test
    void simMeter_aPortOutOfRangeOrInUse_exits2() throws IOException {
        Cli c = Cli.run("sim", "meter", "--tcp", "99999");
        assertEquals(2, c.exit());
        assertTrue(c.err().contains("--tcp must be a port 0..65535"), c.err());
        try (ServerSocket taken = new ServerSocket(0, 1, InetAddress.getLoopbackAddress())) {
            Cli inUse = Cli.run("sim", "meter", "--tcp", String.valueOf(taken.getLocalPort()));
            assertEquals(2, inUse.exit());
            assertTrue(inUse.err().contains("cannot listen"), inUse.err());
        }
    }

    @Test
    void aMeterTimeScaleThatIsNotANumberOfTimes_exits2NamingTheOption_inTheDemoAndTheMeterSimulator() {
        for (String bad : new String[] {"-0.5", "NaN", "1e9"}) {
            Cli demo = Cli.run("demo", "--time-scale", bad, "--parts", "10", "--status", "off");
            assertEquals(2, demo.exit(), bad);
            assertTrue(demo.err().contains("--time-scale must be 0..1000 (was "), demo.err());
            Cli sim = Cli.run("sim", "meter", "--tcp", "0", "--time-scale", bad);
            assertEquals(2, sim.exit(), bad);
            assertTrue(sim.err().contains("--time-scale must be 0..1000 (was "), sim.err());
        }
    }

    @Test
    void anOutputFolderThatDoesNotExist_exits2() {
        Cli c = Cli.run("sim", "lot", "--out", dir.resolve("no/such/folder/lot.csv").toString(), "--parts", "5");
        assertEquals(2, c.exit());
        assertTrue(c.err().contains("does not exist"), c.err());
        Cli r = Cli.run("replay", "--recipe", "config/recipes/mlcc-x7r-100n.yaml", "--in", dir.resolve("none.csv").toString());
        assertEquals(2, r.exit());
        assertFalse(r.err().contains("Exception"), r.err());
    }

    @Test
    void checkPrintsTheTightestGradeWithEnoughDigits_andCompleteLines() {
        Cli c = Cli.run("check", "--recipe", "config/recipes/resistor-prec-4k99.yaml");
        assertEquals(0, c.exit(), c.err());
        // B (±0.1 %) guarded by U = 0.02 % of the limit: accepts 4.98601 kΩ .. 4.99399 kΩ — six figures, not "4.986 kΩ".
        assertTrue(c.out().contains("4.98601 kΩ .. 4.99399 kΩ"), c.out());
        assertTrue(c.out().contains("concentric"), c.out());
        assertFalse(c.out().contains("nested") || c.out().contains("sequential"), c.out());
        assertTrue(c.out().contains("short when |Z| is below 49.90 Ω (0.01000 ×)"), c.out());
        Cli ind = Cli.run("check", "--recipe", "config/recipes/inductor-pwr-4u7.yaml");
        assertTrue(ind.out().contains("ladder") && ind.out().contains("nothing is graded without short compensation"), ind.out());
    }

    @Test
    void aSpreadsheetExportWithAByteOrderMark_replaysLikeThePlainFile() throws IOException {
        Path plain = dir.resolve("plain.csv"), bom = dir.resolve("bom.csv");
        String text = "freq_hz,r_ohm,x_ohm\n1000,16,-1591.5\n1000,17,-1600\n";
        Files.writeString(plain, text);
        Files.write(bom, ("\uFEFF" + text).getBytes(java.nio.charset.StandardCharsets.UTF_8));
        Cli a = Cli.run("replay", "--recipe", "config/recipes/mlcc-x7r-100n.yaml", "--in", plain.toString(), "--json");
        Cli b = Cli.run("replay", "--recipe", "config/recipes/mlcc-x7r-100n.yaml", "--in", bom.toString(), "--json");
        assertEquals(0, b.exit(), b.err());
        assertEquals(a.out(), b.out());
    }

    @Test
    void strictReplay_reportsTheRowItStoppedAt_once_andNotAsSkipped() throws IOException {
        Path f = dir.resolve("bad.csv");
        Files.writeString(f, "freq_hz,r_ohm,x_ohm\n1000,16,-1591.5\n1000,oops,-1600\n1000,16,-1591.5\n");
        Cli c = Cli.run("replay", "--recipe", "config/recipes/mlcc-x7r-100n.yaml", "--in", f.toString(), "--strict");
        assertEquals(2, c.exit());
        assertTrue(c.err().contains("line 3") && c.err().contains("(--strict)"), c.err());
        assertFalse(c.err().contains("(skipped)"), c.err());
    }

    @Test
    void simHandler_aBrokerWithoutScheme_exits2WithTheFormToWrite() {
        Cli c = Cli.run("sim", "handler", "--broker", "127.0.0.1:40577", "--line", "l1");
        assertEquals(2, c.exit());
        assertTrue(c.err().contains("--broker must be tcp://host:port"), c.err());
        assertFalse(c.err().contains("Exception"), c.err());
    }

    @Test
    void scenarioMistakes_speakOfKeysAndValues_notJavaClasses_andRkmOhmsRead() throws IOException {
        String good = Files.readString(Path.of("simulators/scenarios/harrowgate-resistor-4k99.yaml"));
        Path typo = dir.resolve("typo.yaml"), word = dir.resolve("word.yaml"), rkm = dir.resolve("rkm.yaml");
        Files.writeString(typo, good.replace("spread_pct:", "spred_pct:"));
        Files.writeString(word, good.replace("offset_pct:", "offset_pct: lots #"));
        Files.writeString(rkm, good.replaceFirst("nominal: [^\\n]*", "nominal: 33R"));
        for (Path p : new Path[] {typo, word}) {
            Cli c = Cli.run("sim", "lot", "--scenario", p.toString(), "--out", dir.resolve("o.csv").toString(), "--parts", "10");
            assertEquals(2, c.exit(), c.err());
            assertFalse(c.err().contains("java.") || c.err().contains("net.zbin") || c.err().contains("class "), c.err());
        }
        assertTrue(Cli.run("sim", "lot", "--scenario", typo.toString(), "--out", dir.resolve("o.csv").toString()).err()
                .contains("part.spred_pct: unknown key"));
        Cli ok = Cli.run("sim", "lot", "--scenario", rkm.toString(), "--out", dir.resolve("o.csv").toString(), "--parts", "10");
        assertEquals(0, ok.exit(), ok.err());
    }
}
