package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVRecord;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

class ReplayCommandTest {
    static final String RECIPE = "config/recipes/mlcc-x7r-100n.yaml";
    static final ObjectMapper M = new ObjectMapper();

    @TempDir
    Path dir;

    static Map<Integer, Long> countsOf(JsonNode summary) {
        Map<Integer, Long> m = new TreeMap<>();
        for (JsonNode b : summary.get("bins")) m.merge(b.get("bin").asInt(), b.get("count").asLong(), Long::sum);
        return m;
    }

    @Test
    void exampleLot_countsMatchAnIndependentGrading() throws Exception {
        Path lot = Path.of("simulators/lots/lot-mlcc-100n.csv");
        Map<Integer, Long> expected = new TreeMap<>();
        try (var p = CSVFormat.DEFAULT.builder().setHeader().setSkipHeaderRecord(true).get().parse(Files.newBufferedReader(lot))) {
            for (CSVRecord r : p) expected.merge(IndependentMlccGrader.bin(Double.parseDouble(r.get("r_ohm")),
                    Double.parseDouble(r.get("x_ohm"))), 1L, Long::sum);
        }
        Cli c = Cli.run("replay", "--recipe", RECIPE, "--in", lot.toString(), "--json");
        assertEquals(0, c.exit(), c.err());
        JsonNode s = M.readTree(c.out());
        // A row of a plain lot file is a first presentation: an unclean one is a retest (bin 0), not a finished part.
        long retests = expected.getOrDefault(0, 0L);
        expected.remove(0);
        assertTrue(retests > 0, "the example lot has open contacts");
        assertEquals(2000 - retests, s.get("total").asLong());
        assertEquals(retests, s.get("retests").asLong());
        assertEquals(2000, s.get("presentations").asLong());
        assertEquals(expected, countsOf(s));
        long pass = expected.getOrDefault(1, 0L) + expected.getOrDefault(2, 0L) + expected.getOrDefault(3, 0L);
        assertEquals(100.0 * pass / (2000 - retests), s.get("yield_pct").asDouble(), 1e-9);
        assertTrue(s.get("reasons").has("in-grade"));
    }

    @Test
    void badRows_areReportedByLineNumberAndSkipped_tornLastLineToo() throws Exception {
        Path f = dir.resolve("lot.csv");
        Files.writeString(f, String.join("\n", List.of(
                "freq_hz,r_ohm,x_ohm,extra",
                "1000,16,-1591.5,a",
                "1000,sixteen,-1591.5,b",
                "1000,16,-1591.5",
                "-1000,16,-1591.5,c",
                "1000,16,-1591.5,d",
                "1000,16,-15")));  // torn: no newline at the end
        Cli c = Cli.run("replay", "--recipe", RECIPE, "--in", f.toString(), "--json");
        assertEquals(0, c.exit(), c.err());
        assertEquals(2, M.readTree(c.out()).get("total").asLong());
        assertTrue(c.err().contains("line 3: r_ohm is not a number"), c.err());
        assertTrue(c.err().contains("line 4: has 3 fields"), c.err());
        assertTrue(c.err().contains("line 5: freq_hz must be > 0"), c.err());
        assertTrue(c.err().contains("line 7: torn last line"), c.err());
        Cli strict = Cli.run("replay", "--recipe", RECIPE, "--in", f.toString(), "--strict");
        assertEquals(2, strict.exit());
        assertTrue(strict.err().contains("line 3"), strict.err());
    }

    @Test
    void rowsWithNothingMeasured_replayAsTheirReason_strictToo() throws Exception {
        // Found by the combined fault run: the daemon logs a line fault or a meter that answered nothing with blank
        // freq_hz, r_ohm and x_ohm, and replay --strict refused its own log. Blank values need a reason, and a
        // measured R/X needs its frequency.
        Path f = dir.resolve("faults.csv");
        Files.writeString(f, String.join("\n", List.of(
                "freq_hz,r_ohm,x_ohm,reason,attempt",
                "1000,16,-1591.5,,0",
                ",,,line-fault,0",
                ",,,meter-timeout,1",
                "1000,16,-1591.5,,2",
                ",16,-1591.5,,0",
                ",,,,0")) + "\n");
        Cli c = Cli.run("replay", "--recipe", RECIPE, "--in", f.toString(), "--json");
        assertEquals(0, c.exit(), c.err());
        JsonNode s = M.readTree(c.out());
        assertEquals(4, s.get("presentations").asLong(), c.out());
        assertEquals(1, s.path("retest_reasons").path("line-fault").asLong(), "not measured: a retest, as live: " + c.out());
        assertEquals(1, s.path("reasons").path("meter-timeout").asLong(), c.out());
        assertTrue(c.err().contains("line 6: freq_hz is empty"), c.err());
        assertTrue(c.err().contains("line 7: r_ohm is empty"), c.err());
        Path clean = dir.resolve("clean.csv");
        Files.writeString(clean, String.join("\n", List.of(
                "freq_hz,r_ohm,x_ohm,reason,attempt", "1000,16,-1591.5,,0", ",,,line-fault,0", ",,,meter-timeout,1")) + "\n");
        Cli strict = Cli.run("replay", "--recipe", RECIPE, "--in", clean.toString(), "--strict", "--json");
        assertEquals(0, strict.exit(), strict.err());
    }

    @Test
    void inputWithoutRequiredColumns_exits2NamingTheColumn() throws Exception {
        Path f = dir.resolve("bad.csv");
        Files.writeString(f, "freq,r,x\n1000,1,2\n");
        Cli c = Cli.run("replay", "--recipe", RECIPE, "--in", f.toString());
        assertEquals(2, c.exit());
        assertTrue(c.err().contains("freq_hz"), c.err());
        assertEquals(2, Cli.run("replay", "--recipe", RECIPE, "--in", dir.resolve("none.csv").toString()).exit());
    }

    @Test
    void textSummary_listsBinsAndReasons() {
        Cli c = Cli.run("replay", "--recipe", RECIPE, "--in", "simulators/lots/lot-mlcc-100n.csv");
        assertEquals(0, c.exit(), c.err());
        assertTrue(c.out().contains("parts finished") && c.out().contains("2000 presentations"), c.out());
        assertTrue(c.out().contains("in-grade"), c.out());
    }

    @Test
    void aRepeatedColumnName_doesNotShortenTheRows() throws Exception {
        // Found by fuzzing: a header naming a column twice once made the reader index past the row.
        Path f = dir.resolve("dup.csv");
        Files.writeString(f, "freq_hz,r_ohm,x_ohm,note,note\n1000,16,-1591.5,a,b\n1000,16,-1591.5,a\n");
        Cli c = Cli.run("replay", "--recipe", RECIPE, "--in", f.toString(), "--json");
        assertEquals(0, c.exit(), c.err());
        assertEquals(1, M.readTree(c.out()).get("total").asLong());
        assertTrue(c.err().contains("line 3: has 4 fields, header has 5"), c.err());
    }

    @Test
    void aLotWithTooFewGradedPartsForASigma_showsADash_neverNaN() throws Exception {
        // one part graded (no σ from one value, so no Cp or Cpk), one non-finite reading (a retest: no part finished from it)
        Path one = dir.resolve("one.csv");
        Files.writeString(one, "freq_hz,r_ohm,x_ohm\n1000,16,-1591.5\n1000,NaN,-1591.5\n");
        Path html = dir.resolve("one.html");
        Cli c = Cli.run("replay", "--recipe", RECIPE, "--in", one.toString(), "--report", html.toString());
        assertEquals(0, c.exit(), c.err());
        assertTrue(c.out().contains("σ –, Cp –, Cpk – over 1 graded parts"), c.out());
        assertTrue(!c.out().contains("NaN") && !Files.readString(html).contains("NaN"), c.out());
        // nothing finished at all: no yield either, in the summary line, the window's figures and the report
        Path none = dir.resolve("none.csv");
        Files.writeString(none, "freq_hz,r_ohm,x_ohm\n1000,NaN,-1591.5\n");
        Cli n = Cli.run("replay", "--recipe", RECIPE, "--in", none.toString(), "--report", html.toString());
        assertEquals(0, n.exit(), n.err());
        assertTrue(n.out().contains("0 parts finished, yield – (1 presentations") && n.out().contains("presentations: yield –, retests 100.00 %"), n.out());
        assertTrue(!n.out().contains("NaN") && !Files.readString(html).contains("NaN"), n.out());
    }
}
