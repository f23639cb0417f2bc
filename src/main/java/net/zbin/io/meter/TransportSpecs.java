package net.zbin.io.meter;

import net.zbin.core.Unit;
import net.zbin.io.ConfigException;
import net.zbin.io.SpecNode;

/** Reads a {@code transport:} mapping ({@code tcp: {host, port}} or {@code serial: {...}}). */
public final class TransportSpecs {
    private TransportSpecs() {}

    public static TransportSpec parse(SpecNode t) throws ConfigException {
        boolean tcp = t.has("tcp"), serial = t.has("serial");
        if (tcp == serial) throw t.error("tcp", "give exactly one of tcp and serial");
        TransportSpec spec;
        if (tcp) {
            SpecNode n = t.child("tcp");
            String host = n.optText("host", "127.0.0.1");
            int port = n.integer("port");
            int ct = n.optInteger("connect_timeout_ms", 2000);
            n.finish();
            spec = n.build("port", () -> new TransportSpec(host, port, ct, null));
        } else {
            SpecNode n = t.child("serial");
            String port = n.text("port");
            int baud = n.optInteger("baud", 9600);
            int bits = n.optInteger("data_bits", 8);
            String parity = n.optText("parity", "none");
            double stop = n.optNumber("stop_bits", 1, Unit.RATIO);
            String flow = n.optText("flow", "none");
            n.finish();
            SerialSettings s = n.build(null, () -> new SerialSettings(port, baud, bits, parity, stop, flow));
            spec = TransportSpec.serial(s);
        }
        t.finish();
        return spec;
    }
}
