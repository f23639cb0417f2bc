package net.zbin.sim;

import com.fasterxml.jackson.annotation.JsonProperty;
import com.fasterxml.jackson.databind.DeserializationFeature;
import com.fasterxml.jackson.databind.JsonMappingException;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.annotation.JsonDeserialize;
import com.fasterxml.jackson.dataformat.yaml.YAMLFactory;
import java.io.IOException;
import java.io.InputStream;
import java.nio.file.Files;
import java.nio.file.Path;
import net.zbin.core.PartType;

/**
 * An invented production scenario for the simulators: the lot, the part population, the fixture,
 * contact and meter fault rates, and the handler's pace. Numbers take SI prefixes.
 */
public record Scenario(String scenario, String description, long seed, Lot lot, Part part, FixtureSpec fixture,
                       ContactFaults contact, MeterFaults meterFaults, Handler handler) {

    /** @param id lot id; @param partPrefix part ids are prefix-00001, … */
    public record Lot(String id, @JsonProperty("part_prefix") String partPrefix) {}

    /**
     * The population of parts.
     *
     * @param type        capacitor, inductor or resistor
     * @param nominal     nominal value in F, H or Ω
     * @param testFreq    frequency at which loss is specified, in Hz
     * @param offsetPct   population mean deviation in %
     * @param spreadPct   population σ in %
     * @param lossMean    mean D at testFreq (tan δ for C, 1/Q for L, unused for R)
     * @param lossSigma   σ of D
     * @param lossyRate   share of parts with excess loss
     * @param lossyLoss   D of such parts
     * @param seriesOhm   ESR of C; ignored for L (winding R follows from D) and R
     * @param parasitic   ESL of C, self-capacitance of L, series L of R
     * @param seriesSpreadPct σ of a capacitor's ESR from part to part, % of {@code series_ohm} (default 0: all alike)
     */
    public record Part(String type, @JsonDeserialize(using = SiNumber.class) Double nominal,
                       @JsonProperty("test_freq") @JsonDeserialize(using = SiNumber.class) Double testFreq,
                       @JsonProperty("offset_pct") double offsetPct, @JsonProperty("spread_pct") double spreadPct,
                       @JsonProperty("loss_mean") double lossMean, @JsonProperty("loss_sigma") double lossSigma,
                       @JsonProperty("lossy_rate") double lossyRate, @JsonProperty("lossy_loss") double lossyLoss,
                       @JsonProperty("series_ohm") @JsonDeserialize(using = SiNumber.class) Double seriesOhm,
                       @JsonDeserialize(using = SiNumber.class) Double parasitic,
                       @JsonProperty("series_ohm_spread_pct") double seriesSpreadPct) {
        public PartType partType() { return PartType.parse(type); }
    }

    /** Fixture parasitics; see {@link Fixture}. */
    public record FixtureSpec(@JsonDeserialize(using = SiNumber.class) Double stray,
                              @JsonProperty("stray_g_s") @JsonDeserialize(using = SiNumber.class) Double strayGS,
                              @JsonProperty("residual_r_ohm") @JsonDeserialize(using = SiNumber.class) Double residualROhm,
                              @JsonProperty("residual_l_h") @JsonDeserialize(using = SiNumber.class) Double residualLH,
                              @JsonProperty("drift_per_hour") @JsonDeserialize(using = SiNumber.class) Double driftPerHour,
                              @JsonProperty("residual_r_drift_per_hour") @JsonDeserialize(using = SiNumber.class) Double rDriftPerHour) {
        public Fixture toFixture() {
            return new Fixture(z(stray), z(strayGS), z(residualROhm), z(residualLH), z(driftPerHour), z(rDriftPerHour));
        }
    }

    /** Per-part probabilities of contact trouble. */
    public record ContactFaults(@JsonProperty("open_rate") double openRate, @JsonProperty("short_rate") double shortRate,
                                @JsonProperty("intermittent_rate") double intermittentRate,
                                @JsonProperty("intermittent_p") double intermittentP) {}

    /**
     * Per-measurement probabilities of meter trouble, and how noisy the meter is: {@code noise} times its stated
     * repeatability at the pace and averaging in force (default 1; a worn fixture or a noisy floor reads 3–10).
     */
    public record MeterFaults(@JsonProperty("timeout_rate") double timeoutRate, @JsonProperty("garbage_rate") double garbageRate,
                              @JsonProperty("overload_rate") double overloadRate, @JsonProperty("stray_rate") double strayRate,
                              @JsonProperty("late_rate") double lateRate, @JsonProperty("noise") Double noise) {
        public MeterFaults {
            if (noise == null) noise = 1.0;
            if (!(noise >= 0) || noise > 1000) throw new IllegalArgumentException("meter_faults.noise must be 0..1000 (was " + noise + ")");
        }

        public MeterFaults(double timeoutRate, double garbageRate, double overloadRate) { this(timeoutRate, garbageRate, overloadRate, 0, 0, 1.0); }

        public SimMeter.RandomFaults toRandomFaults() {
            return timeoutRate + garbageRate + overloadRate + strayRate + lateRate == 0 ? SimMeter.RandomFaults.NONE
                    : new SimMeter.RandomFaults(timeoutRate, garbageRate, overloadRate, strayRate, lateRate);
        }
    }

    /**
     * @param ratePerS        triggers per second
     * @param checkEvery      an open, a short and a reference check after every this many parts (0: none)
     * @param deadlineMs      how long the handler waits for a decision
     */
    public record Handler(@JsonProperty("rate_per_s") double ratePerS, @JsonProperty("check_every") int checkEvery,
                          @JsonProperty("deadline_ms") int deadlineMs) {}

    private static double z(Double d) { return d == null ? 0 : d; }

    /**
     * The same scenario with what-if changes: the parts' spread times {@code spreadFactor}, their offset (NaN: as
     * is), the fixture's stray drift and contact-resistance drift per hour (NaN: as is).
     */
    public Scenario whatIf(double spreadFactor, double offsetPct, double driftFPerHour, double rDriftOhmPerHour) {
        Part p = part;
        Part np = new Part(p.type(), p.nominal(), p.testFreq(), Double.isNaN(offsetPct) ? p.offsetPct() : offsetPct, p.spreadPct() * spreadFactor,
                p.lossMean(), p.lossSigma(), p.lossyRate(), p.lossyLoss(), p.seriesOhm(), p.parasitic(), p.seriesSpreadPct());
        FixtureSpec f = fixture;
        FixtureSpec nf = new FixtureSpec(f.stray(), f.strayGS(), f.residualROhm(), f.residualLH(),
                Double.isNaN(driftFPerHour) ? f.driftPerHour() : Double.valueOf(driftFPerHour),
                Double.isNaN(rDriftOhmPerHour) ? f.rDriftPerHour() : Double.valueOf(rDriftOhmPerHour));
        return new Scenario(scenario, description, seed, lot, np, nf, contact, meterFaults, handler);
    }

    public Scenario {
        if (lot == null || part == null || fixture == null) throw new IllegalArgumentException("scenario needs lot, part and fixture");
        if (part.nominal() == null || !(part.nominal() > 0)) throw new IllegalArgumentException("part.nominal must be > 0");
        if (part.testFreq() == null || !(part.testFreq() > 0)) throw new IllegalArgumentException("part.test_freq must be > 0");
        part.partType();
        if (contact == null) contact = new ContactFaults(0, 0, 0, 0);
        if (meterFaults == null) meterFaults = new MeterFaults(0, 0, 0);
        if (handler == null) handler = new Handler(100, 0, 150);
    }

    private static final ObjectMapper YAML = new ObjectMapper(new YAMLFactory())
            .enable(DeserializationFeature.FAIL_ON_UNKNOWN_PROPERTIES)
            .enable(com.fasterxml.jackson.core.JsonParser.Feature.STRICT_DUPLICATE_DETECTION)
            .setPropertyNamingStrategy(com.fasterxml.jackson.databind.PropertyNamingStrategies.SNAKE_CASE);

    /** The scenario shipped inside the jar, used when none is named. */
    public static Scenario builtIn() {
        try (InputStream in = Scenario.class.getResourceAsStream("/zbin-sim/default-scenario.yaml")) {
            return YAML.readValue(in, Scenario.class);
        } catch (IOException e) {
            throw new IllegalStateException("built-in scenario unreadable", e);
        }
    }

    /** A mapping error in the words of the file, not of the Java classes behind it. */
    static String plain(JsonMappingException e) {
        if (e instanceof com.fasterxml.jackson.databind.exc.UnrecognizedPropertyException u)
            return "unknown key (known keys here: " + String.join(", ", new java.util.TreeSet<>(u.getKnownPropertyIds().stream().map(Object::toString).toList())) + ")";
        if (e instanceof com.fasterxml.jackson.databind.exc.InvalidFormatException f) {
            String m = e.getOriginalMessage();
            int why = m.indexOf("\": ");
            return "'" + f.getValue() + "' is not " + kind(f.getTargetType()) + (why >= 0 ? ": " + m.substring(why + 3) : "");
        }
        if (e instanceof com.fasterxml.jackson.databind.exc.MismatchedInputException mi && mi.getTargetType() != null)
            return "must be " + kind(mi.getTargetType());
        return e.getOriginalMessage().replaceAll("`[A-Za-z0-9_.$]+`", "value").replaceAll("\\(class [A-Za-z0-9_.$]+\\)", "").replaceAll("\\s+", " ");
    }

    private static String kind(Class<?> t) {
        if (t == Double.class || t == double.class) return "a number";
        if (t == Integer.class || t == int.class || t == Long.class || t == long.class) return "a whole number";
        if (t == Boolean.class || t == boolean.class) return "true or false";
        if (t == String.class) return "a text";
        if (t.isRecord()) return "a mapping of keys";
        return "a value of the right kind";
    }

    /**
     * Reads a scenario file (YAML, keys in snake case; an unknown or repeated key is refused).
     *
     * @throws IllegalArgumentException naming the file, the key path and the problem
     */
    public static Scenario read(Path file) throws IOException {
        try {
            return YAML.readValue(Files.readAllBytes(file), Scenario.class);
        } catch (JsonMappingException e) {
            String path = e.getPath().stream().map(r -> r.getFieldName() != null ? r.getFieldName() : "[" + r.getIndex() + "]")
                    .reduce((a, b) -> b.startsWith("[") ? a + b : a + "." + b).orElse("(top level)");
            throw new IllegalArgumentException(file + ": " + path + ": " + plain(e));
        } catch (com.fasterxml.jackson.core.JsonProcessingException e) {
            for (Throwable t = e; t != null; t = t.getCause())
                if (t instanceof org.yaml.snakeyaml.error.MarkedYAMLException m && m.getProblemMark() != null)
                    throw new IllegalArgumentException(file + ": line " + (m.getProblemMark().getLine() + 1) + ": not valid YAML: "
                            + (m.getProblem() + (m.getContext() != null ? " (" + m.getContext() + ")" : "")).replaceAll("\\s+", " "));
            throw new IllegalArgumentException(file + ": line " + (e.getLocation() == null ? "?" : e.getLocation().getLineNr())
                    + ": " + e.getOriginalMessage().replaceAll("\\s+", " "));
        }
    }
}
