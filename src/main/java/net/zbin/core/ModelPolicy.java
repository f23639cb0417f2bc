package net.zbin.core;

import java.util.Locale;

/**
 * How the equivalent model is chosen. In AUTO: |Z| below {@code seriesBelowOhm} → series, above
 * {@code parallelAboveOhm} → parallel (common practice: ~100 Ω / ~10 kΩ), in between by part type:
 * capacitors parallel (leakage dominates a small C), inductors and resistors series.
 */
public record ModelPolicy(Mode mode, double seriesBelowOhm, double parallelAboveOhm) {
    public enum Mode {
        AUTO, SERIES, PARALLEL;

        public static Mode parse(String s) {
            try {
                return valueOf(s.toUpperCase(Locale.ROOT));
            } catch (IllegalArgumentException e) {
                throw new IllegalArgumentException("unknown model mode '" + s + "' (expected auto, series or parallel)");
            }
        }
    }

    public static final ModelPolicy DEFAULT = new ModelPolicy(Mode.AUTO, 100, 10_000);

    public ModelPolicy {
        Checks.present("mode", mode);
        Checks.positive("seriesBelowOhm", seriesBelowOhm);
        Checks.positive("parallelAboveOhm", parallelAboveOhm);
        if (seriesBelowOhm > parallelAboveOhm)
            throw new IllegalArgumentException("seriesBelowOhm must be <= parallelAboveOhm (was "
                    + seriesBelowOhm + " > " + parallelAboveOhm + ")");
    }

    /** The model for this reading and a short kebab-case reason for it. */
    public Choice choose(PartType type, double zOhm) {
        return switch (mode) {
            case SERIES -> new Choice(EquivalentModel.SERIES, "forced-series");
            case PARALLEL -> new Choice(EquivalentModel.PARALLEL, "forced-parallel");
            case AUTO -> {
                if (zOhm < seriesBelowOhm) yield new Choice(EquivalentModel.SERIES, "low-z-series");
                if (zOhm > parallelAboveOhm) yield new Choice(EquivalentModel.PARALLEL, "high-z-parallel");
                yield type == PartType.CAPACITOR
                        ? new Choice(EquivalentModel.PARALLEL, "mid-z-capacitor-parallel")
                        : new Choice(EquivalentModel.SERIES, "mid-z-" + type.key() + "-series");
            }
        };
    }

    public record Choice(EquivalentModel model, String reason) {}
}
