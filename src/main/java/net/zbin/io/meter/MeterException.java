package net.zbin.io.meter;

import net.zbin.core.FaultKind;

/**
 * A failed exchange with the meter. The kind says what failed; {@code sent} and {@code received}
 * say what went out and what (if anything) came back, so a log line explains itself.
 */
public final class MeterException extends Exception {
    private final FaultKind kind;
    private final String sent;
    private final String received;

    public MeterException(FaultKind kind, String sent, String received, String message) {
        this(kind, sent, received, message, null);
    }

    public MeterException(FaultKind kind, String sent, String received, String message, Throwable cause) {
        super(kind.reason() + ": " + message + " (sent " + quote(sent) + ", received " + quote(received) + ")", cause);
        this.kind = kind;
        this.sent = sent;
        this.received = received;
    }

    public FaultKind kind() { return kind; }

    public String sent() { return sent; }

    public String received() { return received; }

    static String quote(String s) {
        if (s == null) return "nothing";
        StringBuilder b = new StringBuilder("'");
        for (char c : s.toCharArray()) {
            if (c == '\n') b.append("\\n");
            else if (c == '\r') b.append("\\r");
            else if (c < 32 || c > 126) b.append(String.format("\\x%02x", (int) c & 0xff));
            else b.append(c);
            if (b.length() > 120) { b.append("…"); break; }
        }
        return b.append("'").toString();
    }
}
