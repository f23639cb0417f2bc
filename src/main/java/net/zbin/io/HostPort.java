package net.zbin.io;

/**
 * An address to listen on, written {@code host:port} ({@code [::1]:8080} for an IPv6 literal); port 0 asks for any
 * free one.
 */
public record HostPort(String host, int port) {
    public HostPort {
        if (host == null || host.isEmpty()) throw new IllegalArgumentException("host is empty");
        if (port < 0 || port > 65535) throw new IllegalArgumentException("port must be 0..65535 (was " + port + ")");
    }

    /** @throws IllegalArgumentException saying what is wrong with the text, with the text */
    public static HostPort parse(String text) {
        String why = "must be host:port with a port 0..65535, e.g. 127.0.0.1:8080 (was '" + text + "')";
        int colon = text == null ? -1 : text.lastIndexOf(':');
        if (colon <= 0) throw new IllegalArgumentException(why);
        String host = text.substring(0, colon);
        if (host.startsWith("[") && host.endsWith("]")) host = host.substring(1, host.length() - 1);
        try {
            return new HostPort(host, Integer.parseInt(text.substring(colon + 1)));
        } catch (IllegalArgumentException e) { // a bad number, an empty host or a port out of range
            throw new IllegalArgumentException(why);
        }
    }

    @Override
    public String toString() { return (host.contains(":") ? "[" + host + "]" : host) + ":" + port; }
}
