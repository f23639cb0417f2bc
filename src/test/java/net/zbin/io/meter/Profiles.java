package net.zbin.io.meter;

import java.nio.file.Path;

/** The shipped simulator profile, pointed at a given transport. */
final class Profiles {
    private Profiles() {}

    static MeterProfile sim(TransportSpec t) throws Exception {
        return MeterProfileLoader.load(Path.of("config/meters/zbin-sim.yaml")).withTransport(t);
    }

    static SerialSettings serial(Path p) { return new SerialSettings(p.toString(), 115200, 8, "none", 1, "none"); }
}
