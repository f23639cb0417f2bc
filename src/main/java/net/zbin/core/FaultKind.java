package net.zbin.core;

/** Why no usable reading exists; each maps to a reason code and is retested, then rejected. */
public enum FaultKind {
    TIMEOUT("meter-timeout"), GARBLED("meter-garbled"), DISCONNECTED("meter-disconnected"),
    INSTRUMENT_ERROR("meter-error"), OVERLOAD("overload");

    private final String reason;

    FaultKind(String reason) { this.reason = reason; }

    public String reason() { return reason; }
}
