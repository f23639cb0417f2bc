package net.zbin.io.meter;

/**
 * Which link a meter is on: TCP (host, port) or serial. Exactly one of {@code serial} and
 * {@code tcpHost} is set.
 */
public record TransportSpec(String tcpHost, int tcpPort, int connectTimeoutMs, SerialSettings serial) {
    public TransportSpec {
        if ((tcpHost == null) == (serial == null)) throw new IllegalArgumentException("give exactly one of tcp and serial");
        if (tcpHost != null && (tcpPort <= 0 || tcpPort > 65535))
            throw new IllegalArgumentException("port must be 1..65535 (was " + tcpPort + ")");
    }

    public static TransportSpec tcp(String host, int port) { return new TransportSpec(host, port, 2000, null); }

    public static TransportSpec serial(SerialSettings s) { return new TransportSpec(null, 0, 0, s); }

    public Transport create() {
        return serial != null ? new SerialTransport(serial) : new TcpTransport(tcpHost, tcpPort, connectTimeoutMs);
    }
}
