package net.zbin.sim;

/** What the simulated meter does in answer to one line. */
public sealed interface Reply {
    /** A normal reply line (without terminator). */
    record Text(String line) implements Reply {}

    /** A set command: nothing is sent back. */
    record None() implements Reply {}

    /** An injected timeout: the query is swallowed. */
    record Silent() implements Reply {}

    /** Injected line noise: bytes that are no valid reply. */
    record Garbage(byte[] bytes) implements Reply {}

    /** A reply line followed by a stray line that answers nothing. */
    record WithStray(String line, String stray) implements Reply {}

    /** Nothing now; the line is sent after the delay, between whatever exchanges happen by then. */
    record Later(String line, long delayMs) implements Reply {}

    /** Injected link drop: the simulator closes the connection. */
    record Disconnect() implements Reply {}

    Reply NONE = new None();
    Reply SILENT = new Silent();
}
