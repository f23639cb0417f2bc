package net.zbin.io.meter;

import java.util.Set;

/**
 * Serial line settings.
 *
 * @param port     device path (a socat pty link works: it is opened by path)
 * @param baud     bits per second
 * @param dataBits 5..8
 * @param parity   none, even, odd, mark, space
 * @param stopBits 1, 1.5 or 2
 * @param flow     none, rtscts or xonxoff
 */
public record SerialSettings(String port, int baud, int dataBits, String parity, double stopBits, String flow) {
    public static final Set<String> PARITIES = Set.of("none", "even", "odd", "mark", "space");
    public static final Set<String> FLOWS = Set.of("none", "rtscts", "xonxoff");

    public SerialSettings {
        if (port == null || port.isBlank()) throw new IllegalArgumentException("port is required");
        if (baud < 50 || baud > 4_000_000) throw new IllegalArgumentException("baud must be 50..4000000 (was " + baud + ")");
        if (dataBits < 5 || dataBits > 8) throw new IllegalArgumentException("data_bits must be 5..8 (was " + dataBits + ")");
        if (!PARITIES.contains(parity)) throw new IllegalArgumentException("parity must be one of " + PARITIES + " (was " + parity + ")");
        if (stopBits != 1 && stopBits != 1.5 && stopBits != 2) throw new IllegalArgumentException("stop_bits must be 1, 1.5 or 2 (was " + stopBits + ")");
        if (!FLOWS.contains(flow)) throw new IllegalArgumentException("flow must be one of " + FLOWS + " (was " + flow + ")");
    }
}
