package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.stream.Stream;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.Arguments;
import org.junit.jupiter.params.provider.MethodSource;

/** Each kind of recipe mistake is refused with exit 2, naming the file and the key. */
class RecipeMistakesTest {
    static final String GOOD = """
            recipe: corpus-cap
            part: capacitor
            nominal: 100n
            test: {freq: 1k, level_v: 1.0, speed: medium, averaging: 1}
            model: {mode: auto}
            primary: Cs
            grading: concentric
            grades:
              - {name: J, bin: 1, tolerance: J}
              - {name: K, bin: 2, tolerance: K}
            guard_band: {pct: 0.2}
            gates: {d_max: 0.025}
            reject: {low: 7, high: 8, gate: 9, contact: 10, short: 10, overload: 11, fault: 11}
            retest: {count: 1, bin: 0}
            """;

    @TempDir
    Path dir;

    Path write(String text) throws IOException {
        Path p = dir.resolve("r.yaml");
        Files.writeString(p, text);
        return p;
    }

    @Test
    void theBaseRecipeOfTheCorpus_isValid() throws IOException {
        Cli c = Cli.run("check", "--recipe", write(GOOD).toString());
        assertEquals(0, c.exit(), c.err());
        assertTrue(c.out().contains("bin   1  J"), c.out());
    }

    static Stream<Arguments> mistakes() {
        return Stream.of(
                Arguments.of("unknown top-level key", GOOD + "colour: blue\n", "colour"),
                Arguments.of("misspelled nested key", GOOD.replace("d_max", "dmax"), "gates.dmax"),
                Arguments.of("missing nominal", GOOD.replace("nominal: 100n\n", ""), "nominal"),
                Arguments.of("nominal not a number", GOOD.replace("nominal: 100n", "nominal: lots"), "nominal"),
                Arguments.of("negative nominal", GOOD.replace("nominal: 100n", "nominal: -100n"), "nominal"),
                Arguments.of("unknown part type", GOOD.replace("part: capacitor", "part: diode"), "part"),
                Arguments.of("zero frequency", GOOD.replace("freq: 1k", "freq: 0"), "test.freq"),
                Arguments.of("bad speed", GOOD.replace("speed: medium", "speed: turbo"), "test.speed"),
                Arguments.of("inverted limits", GOOD.replace("{name: K, bin: 2, tolerance: K}", "{name: K, bin: 2, low_pct: 10, high_pct: -10}"), "grades[1]"),
                Arguments.of("nested grades that do not widen", GOOD.replace("tolerance: K", "low_pct: -3, high_pct: 3"), "grades[1]"),
                Arguments.of("overlapping sequential grades", GOOD.replace("grading: concentric", "grading: ladder")
                        .replace("{name: J, bin: 1, tolerance: J}", "{name: J, bin: 1, low_pct: -10, high_pct: 2}")
                        .replace("{name: K, bin: 2, tolerance: K}", "{name: K, bin: 2, low_pct: 0, high_pct: 10}"), "grades[1]"),
                Arguments.of("gap in sequential grades", GOOD.replace("grading: concentric", "grading: ladder")
                        .replace("{name: J, bin: 1, tolerance: J}", "{name: J, bin: 1, low_pct: -10, high_pct: 0}")
                        .replace("{name: K, bin: 2, tolerance: K}", "{name: K, bin: 2, low_pct: 1, high_pct: 10}"), "grades[1]"),
                Arguments.of("pass bin reused as reject bin", GOOD.replace("gate: 9", "gate: 1"), "reject.gate"),
                Arguments.of("retest bin reused as pass bin", GOOD.replace("bin: 0}", "bin: 2}"), "retest.bin"),
                Arguments.of("guard band wider than a grade", GOOD.replace("pct: 0.2", "pct: 6"), "guard_band.pct"),
                Arguments.of("unknown tolerance letter", GOOD.replace("tolerance: J", "tolerance: X"), "grades[0].tolerance"),
                Arguments.of("limits given two ways", GOOD.replace("tolerance: J}", "tolerance: J, pct: 5}"), "grades[0].pct"),
                Arguments.of("grade without limits", GOOD.replace(", tolerance: J}", "}"), "grades[0].tolerance"),
                Arguments.of("duplicate grade name", GOOD.replace("name: K", "name: J"), "grades[1].name"),
                Arguments.of("parameter of another part type", GOOD.replace("primary: Cs", "primary: Ls"), "primary"),
                Arguments.of("series parameter with parallel model", GOOD.replace("mode: auto", "mode: parallel"), "primary"),
                Arguments.of("q_min contradicting d_max", GOOD.replace("d_max: 0.025", "d_max: 0.025, q_min: 100"), "gates.q_min"),
                Arguments.of("theta window inverted", GOOD.replace("d_max: 0.025", "theta_min_deg: -80, theta_max_deg: -89"), "gates.theta_min_deg"),
                Arguments.of("bin not a whole number", GOOD.replace("low: 7", "low: seven"), "reject.low"),
                Arguments.of("missing reject bins", GOOD.replace("reject: {low: 7, high: 8, gate: 9, contact: 10, short: 10, overload: 11, fault: 11}\n", ""), "reject"),
                Arguments.of("missing one reject bin", GOOD.replace("fault: 11", "").replace("overload: 11, ", "overload: 11"), "reject.fault"),
                Arguments.of("retest count too high", GOOD.replace("count: 1", "count: 50"), "retest.count"),
                Arguments.of("model thresholds inverted", GOOD.replace("mode: auto}", "mode: auto, series_below_ohm: 10k, parallel_above_ohm: 100}").replace("primary: Cs\n", ""), "model"),
                Arguments.of("low limit below -100 %", GOOD.replace("tolerance: K", "low_pct: -150, high_pct: 10"), "grades[1]"),
                Arguments.of("grades not a list", GOOD.replace("grades:\n  - {name: J, bin: 1, tolerance: J}\n  - {name: K, bin: 2, tolerance: K}", "grades: J"), "grades"),
                Arguments.of("broken YAML", GOOD + "grades: [\n", "line"),
                Arguments.of("bad recipe id", GOOD.replace("recipe: corpus-cap", "recipe: 'has spaces'"), "recipe"),
                Arguments.of("contact factor not above 1", GOOD + "contact: {open_factor: 0.5}\n", "contact.open_factor"),
                Arguments.of("unknown mode word lists the valid ones", GOOD.replace("grading: concentric", "grading: stacked"),
                        "must be one of: concentric (tolerance windows centred on the nominal, tightest first), ladder"),
                Arguments.of("unknown mode word", GOOD.replace("grading: concentric", "grading: spiral"), "grading"),
                Arguments.of("capacitance unit on an inductor", GOOD.replace("part: capacitor", "part: inductor").replace("nominal: 100n", "nominal: 10uF")
                        .replace("primary: Cs", "primary: Ls").replace("d_max: 0.025", "q_min: 10"), "nominal"),
                Arguments.of("resistance unit on a frequency", GOOD.replace("freq: 1k", "freq: 100kOhm"), "test.freq"),
                Arguments.of("frequency unit on a level", GOOD.replace("level_v: 1.0", "level_v: 1kHz"), "test.level_v"),
                Arguments.of("prefix on a ratio", GOOD.replace("d_max: 0.025", "d_max: 25m"), "gates.d_max"),
                Arguments.of("capacitance on an ESR gate", GOOD.replace("d_max: 0.025", "esr_max_ohm: 1uF"), "gates.esr_max_ohm"),
                Arguments.of("bare three digits on a capacitor", GOOD.replace("nominal: 100n", "nominal: 104"), "{code: 104}"),
                Arguments.of("bare number of farads", GOOD.replace("nominal: 100n", "nominal: 2"), "nominal"),
                Arguments.of("R notation on a capacitor", GOOD.replace("nominal: 100n", "nominal: 4R7"), "{code: 4R7}"),
                Arguments.of("resistor code form on a capacitor", GOOD.replace("nominal: 100n", "nominal: {code: 4K7}"), "nominal.code"),
                Arguments.of("four-digit code on a capacitor", GOOD.replace("nominal: 100n", "nominal: {code: 1042}"), "nominal.code"),
                Arguments.of("unknown key beside a code", GOOD.replace("nominal: 100n", "nominal: {code: 104, unit: pF}"), "nominal.unit"),
                Arguments.of("duplicate key", GOOD + "nominal: 220n\n", "nominal"),
                Arguments.of("Z graded without a phase window", GOOD.replace("part: capacitor", "part: resistor").replace("nominal: 100n", "nominal: 1k")
                        .replace("primary: Cs", "primary: Z").replace("d_max: 0.025", "esr_max_ohm: 2k"), "theta_min_deg"),
                Arguments.of("plausible window inverted", GOOD + "plausible: {theta_min_deg: -40, theta_max_deg: -60}\n", "plausible.theta_min_deg"),
                Arguments.of("monitor baseline half given", GOOD + "monitor: {baseline_mean_pct: 0.5}\n", "monitor.baseline_sigma_pct"),
                Arguments.of("monitor subgroup out of range", GOOD + "monitor: {subgroup: 0}\n", "monitor.subgroup"),
                Arguments.of("monitor key misspelled", GOOD + "monitor: {cusum_hh: 5}\n", "monitor.cusum_hh"),
                Arguments.of("guard bin reused as pass bin", GOOD.replace("fault: 11}", "fault: 11, guard: 1}"), "reject.guard"),
                Arguments.of("guard band that leaves an asymmetric grade no room", GOOD.replace("tolerance: J}", "low_pct: -0.5, high_pct: 0.5}")
                        .replace("pct: 0.2", "uncertainty_pct: 0.6"), "guard_band.uncertainty_pct"));
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("mistakes")
    void recipeMistake_exits2NamingFileAndKey(String what, String text, String key) throws IOException {
        Path p = write(text);
        Cli c = Cli.run("check", "--recipe", p.toString());
        assertEquals(2, c.exit(), what + ": " + c.out() + c.err());
        assertTrue(c.err().contains(p.toString()), what + ": message names the file: " + c.err());
        assertTrue(c.err().contains(key), what + ": message names key '" + key + "': " + c.err());
    }

    static Stream<Arguments> implausible() {
        return Stream.of(
                Arguments.of(GOOD.replace("freq: 1k", "freq: 1mHz"), "test.freq", "did you mean 1 MHz (`1M`)?"),
                Arguments.of(GOOD.replace("freq: 1k", "freq: 1m"), "test.freq", "did you mean 1 MHz (`1M`)?"),
                Arguments.of(GOOD.replace("d_max: 0.025", "d_max: 10"), "gates.d_max", "did you mean 10 % (`0.1`)?"));
    }

    @ParameterizedTest(name = "{1}")
    @MethodSource("implausible")
    void implausibleNumbers_areRefusedNamingTheLikelyMeantValue(String text, String key, String hint) throws IOException {
        Path p = write(text);
        Cli c = Cli.run("check", "--recipe", p.toString());
        assertEquals(2, c.exit(), c.out() + c.err());
        assertTrue(c.err().contains(key) && c.err().contains(hint), c.err());
    }

    static Stream<Arguments> values() {
        // Plain numbers are plain values; codes only in the explicit {code: …} form, in the trade's units
        // (IEC 60062 marking codes: capacitors in pF, resistors in Ω; inductors in µH by common practice).
        return Stream.of(
                Arguments.of("resistor", "1000", 1000.0),
                Arguments.of("resistor", "4990", 4990.0),
                Arguments.of("resistor", "100", 100.0),
                Arguments.of("resistor", "1e3", 1000.0),
                Arguments.of("resistor", "4.99k", 4990.0),
                Arguments.of("resistor", "4K99", 4990.0),
                Arguments.of("resistor", "4R7", 4.7),
                Arguments.of("resistor", "'{code: 4991}'", 4990.0),
                Arguments.of("resistor", "'{code: 472}'", 4700.0),
                Arguments.of("capacitor", "100n", 100e-9),
                Arguments.of("capacitor", "2p2", 2.2e-12),
                Arguments.of("capacitor", "'{code: 104}'", 100e-9),
                Arguments.of("capacitor", "'{code: 4R7}'", 4.7e-12),
                Arguments.of("capacitor", "0.000001", 1e-6),
                Arguments.of("capacitor", "1F", 1.0),
                Arguments.of("inductor", "4u7", 4.7e-6),
                Arguments.of("inductor", "'{code: 4R7}'", 4.7e-6),
                Arguments.of("inductor", "'{code: 101}'", 100e-6),
                Arguments.of("inductor", "'{code: 4N7}'", 4.7e-9));
    }

    @ParameterizedTest(name = "{0} nominal {1}")
    @MethodSource("values")
    void nominal_meansWhatItSays(String part, String text, double expected) throws Exception {
        String primary = switch (part) { case "resistor" -> "Rs"; case "inductor" -> "Ls"; default -> "Cs"; };
        String gate = part.equals("capacitor") ? "d_max: 0.025" : "esr_max_ohm: 1G";
        String yaml = GOOD.replace("part: capacitor", "part: " + part).replace("nominal: 100n", "nominal: " + text.replace("'", ""))
                .replace("primary: Cs", "primary: " + primary).replace("d_max: 0.025", gate);
        var r = net.zbin.io.RecipeLoader.load(write(yaml));
        assertEquals(expected, r.nominal(), expected * 1e-15, text);
    }

    @Test
    void missingRecipeFile_exits2() {
        Cli c = Cli.run("check", "--recipe", dir.resolve("nope.yaml").toString());
        assertEquals(2, c.exit());
        assertTrue(c.err().contains("file not found"), c.err());
    }
}
