package net.zbin.app;

import picocli.CommandLine.Option;

/** The pace of a simulated handler: the {@code --rate} option shared by demo and sim handler. */
final class RateOption {
    @Option(names = "--rate", defaultValue = "50", paramLabel = "PER_S", description = "presentations per second at most (default ${DEFAULT-VALUE})")
    double rate;

    /** Presentations per second, after checking it. */
    double perSecond() throws UsageException {
        if (!(rate > 0) || !Double.isFinite(rate)) throw new UsageException("--rate must be > 0 (was " + rate + ")");
        return rate;
    }
}
