package net.zbin.io;

import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Random;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import net.jqwik.api.lifecycle.AfterContainer;
import net.jqwik.api.lifecycle.BeforeContainer;
import net.zbin.io.mqtt.PayloadException;
import net.zbin.io.mqtt.TriggerCodec;

/**
 * Random and mutated inputs (jqwik, seeded) for every reader of outside input: no uncaught exception,
 * and every rejection a message that names what is wrong (the file, key or field). 85 000 inputs here,
 * 25 000 more for the meter link in {@code ResponseFuzzTest}.
 */
public class InputFuzzTest {
    static Path dir;

    @BeforeContainer
    static void dir() throws Exception {
        dir = Files.createTempDirectory("zbin-fuzz");
        // What the example line config names, beside the mutated copies, so that the mutations reach the config itself.
        Files.createDirectories(dir.resolve("meters"));
        Files.copy(Path.of("config/meters/zbin-sim.yaml"), dir.resolve("meters/zbin-sim.yaml"));
        Files.createDirectories(dir.resolve("recipes"));
        try (var s = Files.list(Path.of("config/recipes"))) {
            for (Path p : s.toList()) Files.copy(p, dir.resolve("recipes").resolve(p.getFileName()));
        }
    }

    @AfterContainer
    static void clean() throws Exception {
        try (var s = Files.walk(dir)) {
            s.sorted(java.util.Comparator.reverseOrder()).forEach(p -> p.toFile().delete());
        }
    }

    static final String[] TRIGGERS = {"{\"seq\": 12, \"part\": \"NC104-000012\", \"lot\": \"HG-2612-014\", \"kind\": \"part\", \"retest_of\": 11}",
            "{\"seq\": 0}", "{\"seq\": 3, \"kind\": \"open\"}", "{\"seq\": 9007199254740993, \"part\": \"\\u00e9\"}"};
    static final String[] COMMANDS = {"{\"cmd\":\"pause\",\"id\":\"a1\"}", "{\"cmd\":\"recipe\",\"name\":\"mlcc-x7r-100n\"}",
            "{\"cmd\":\"compensate\",\"kind\":\"load\",\"std_r\":100,\"std_x\":0}", "{\"cmd\":\"lot\",\"lot\":\"HG-1\"}"};

    /** A seed text with a few random edits: characters inserted, deleted, replaced or repeated, or cut short. */
    public static String mutate(String seed, Random rnd) {
        StringBuilder s = new StringBuilder(seed);
        String alphabet = "{}[]\":,.-+eE0123456789 \n\t#&*!|>?@`'\\abcxyz\u0000\u00e9\u2212";
        int edits = 1 + rnd.nextInt(6);
        for (int i = 0; i < edits && s.length() > 0; i++) {
            int at = rnd.nextInt(s.length());
            switch (rnd.nextInt(6)) {
                case 0 -> s.insert(at, alphabet.charAt(rnd.nextInt(alphabet.length())));
                case 1 -> s.deleteCharAt(at);
                case 2 -> s.setCharAt(at, alphabet.charAt(rnd.nextInt(alphabet.length())));
                case 3 -> s.insert(at, s.substring(at, Math.min(s.length(), at + 1 + rnd.nextInt(20))));
                case 4 -> s.setLength(at);
                default -> s.append(alphabet.charAt(rnd.nextInt(alphabet.length())));
            }
        }
        return s.toString();
    }

    public static String random(Random rnd, int max) {
        StringBuilder s = new StringBuilder();
        int n = rnd.nextInt(max);
        for (int i = 0; i < n; i++) s.append((char) (rnd.nextInt(4) == 0 ? rnd.nextInt(0x3000) : 32 + rnd.nextInt(95)));
        return s.toString();
    }

    @Property(seed = "8101") // tries: jqwik.tries.default, set from the build property zbin.fuzz.tries
    void triggerDecoder_acceptsOrRejectsWithAReason(@ForAll long seed) {
        Random rnd = new Random(seed);
        String text = rnd.nextInt(5) == 0 ? random(rnd, 300) : mutate(TRIGGERS[rnd.nextInt(TRIGGERS.length)], rnd);
        try {
            TriggerCodec.decode(text.getBytes(StandardCharsets.UTF_8));
        } catch (PayloadException e) {
            assertFalse(e.getMessage() == null || e.getMessage().isBlank(), "a rejection says why: " + text);
        }
    }

    @Property(seed = "8102") // tries: jqwik.tries.default, set from the build property zbin.fuzz.tries
    void commandDecoder_acceptsOrRejectsWithAReason(@ForAll long seed) {
        Random rnd = new Random(seed);
        String text = rnd.nextInt(5) == 0 ? random(rnd, 300) : mutate(COMMANDS[rnd.nextInt(COMMANDS.length)], rnd);
        try {
            var n = TriggerCodec.object(text.getBytes(StandardCharsets.UTF_8));
            TriggerCodec.text(n, "cmd");
            TriggerCodec.text(n, "name");
        } catch (PayloadException e) {
            assertFalse(e.getMessage() == null || e.getMessage().isBlank(), "a rejection says why: " + text);
        }
    }

    /** Loads a mutated copy of a file; a refusal must name the file. */
    static void fileFuzz(String seedFile, long seed, String ext, Loader loader) throws Exception {
        Random rnd = new Random(seed);
        String text = mutate(Files.readString(Path.of(seedFile)), rnd);
        Path f = dir.resolve("f-" + (seed & 0xffff) + ext);
        Files.writeString(f, text);
        try {
            loader.load(f);
        } catch (ConfigException e) {
            assertTrue(e.getMessage().contains(f.toString()), "the message names the file: " + e.getMessage());
        }
    }

    interface Loader {
        void load(Path p) throws Exception;
    }

    @Property(seed = "8103") // tries: jqwik.tries.default, set from the build property zbin.fuzz.tries
    void recipeLoader_loadsOrRefusesNamingTheFile(@ForAll long seed) throws Exception {
        String[] seeds = {"config/recipes/mlcc-x7r-100n.yaml", "config/recipes/inductor-pwr-4u7.yaml",
                "config/recipes/resistor-prec-4k99.yaml", "config/recipes/mlcc-c0g-100p.yaml"};
        fileFuzz(seeds[(int) Math.floorMod(seed, (long) seeds.length)], seed, ".yaml", RecipeLoader::load);
    }

    @Property(seed = "8104") // tries: jqwik.tries.default, set from the build property zbin.fuzz.tries
    void lineConfigLoader_loadsOrRefusesNamingTheFile(@ForAll long seed) throws Exception {
        fileFuzz("config/line.yaml", seed, ".yaml", LineConfigLoader::load);
    }

    @Property(seed = "8105") // tries: jqwik.tries.default, set from the build property zbin.fuzz.tries
    void csvReader_readsOrReportsEveryBadRowByLine(@ForAll long seed) throws Exception {
        Random rnd = new Random(seed);
        String lot = "freq_hz,r_ohm,x_ohm,part,lot,kind,reason,attempt,comp\n1000,17.7,-1537.7,P1,L,part,,0,user\n"
                + "1000,,,P2,L,part,meter-timeout,1,none\n1000,0,-7.9e7,O,L,open,fixture-ok,0,user\n";
        Path f = dir.resolve("l-" + (seed & 0xffff) + ".csv");
        Files.writeString(f, rnd.nextInt(10) == 0 ? random(rnd, 500) : mutate(lot, rnd));
        try (ReadingSource src = ReadingSource.open(f, b -> assertTrue(b.line() >= 1 && !b.message().isBlank(), b.toString()))) {
            while (src.next() != null) { }
        } catch (ConfigException e) {
            assertTrue(e.getMessage().contains(f.toString()), e.getMessage());
        } catch (java.io.IOException e) {
            assertTrue(e.getMessage().contains(f.toString()), e.getMessage());
        }
    }
}
