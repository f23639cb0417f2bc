package net.zbin.io.meter;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Random;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import net.zbin.core.FaultKind;
import net.zbin.io.ConfigException;
import net.zbin.io.InputFuzzTest;

/** Meter replies and meter profiles, random and mutated: a reading, or a typed failure / a refusal naming the file. */
class ResponseFuzzTest {
    static final MeterProfile SIM = load();

    static MeterProfile load() {
        try {
            return MeterProfileLoader.load(Path.of("config/meters/zbin-sim.yaml"));
        } catch (ConfigException e) {
            throw new AssertionError(e);
        }
    }

    @Property(seed = "8201") // tries: jqwik.tries.default, set from the build property zbin.fuzz.tries
    void measureReplies_parseOrFailAsGarbledWithWhatWasSentAndReceived(@ForAll long seed) {
        Random rnd = new Random(seed);
        String[] good = {"16.02,-1591.5,GOOD", "1e-3,2.5E+2,OVER", "0,0,FAIL", "-0.0,-1e30,GOOD"};
        String reply = rnd.nextInt(6) == 0 ? InputFuzzTest.random(rnd, 80) : InputFuzzTest.mutate(good[rnd.nextInt(good.length)], rnd);
        var sep = java.util.regex.Pattern.compile(java.util.regex.Pattern.quote(SIM.separator()));
        try {
            ProfileMeterSession.parse(SIM, sep, reply);
        } catch (MeterException e) {
            assertEquals(FaultKind.GARBLED, e.kind(), reply);
            assertTrue(e.getMessage() != null && !e.getMessage().isBlank());
        }
    }

    @Property(seed = "8202") // tries: jqwik.tries.default, set from the build property zbin.fuzz.tries
    void meterProfileLoader_loadsOrRefusesNamingTheFile(@ForAll long seed) throws Exception {
        Path dir = Files.createTempDirectory("zbin-fuzz-profile");
        Path f = dir.resolve("p.yaml");
        Files.writeString(f, InputFuzzTest.mutate(Files.readString(Path.of("config/meters/zbin-sim.yaml")), new Random(seed)));
        try {
            MeterProfileLoader.load(f);
        } catch (ConfigException e) {
            assertTrue(e.getMessage().contains(f.toString()), e.getMessage());
        } finally {
            Files.delete(f);
            Files.delete(dir);
        }
    }
}
