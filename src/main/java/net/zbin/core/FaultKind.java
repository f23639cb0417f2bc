package net.zbin.core;

/** Why no usable reading exists; each maps to a reason code and is retested, then rejected. */
public enum FaultKind {
    TIMEOUT(Reason.METER_TIMEOUT), GARBLED(Reason.METER_GARBLED), DISCONNECTED(Reason.METER_DISCONNECTED),
    INSTRUMENT_ERROR(Reason.METER_ERROR), OVERLOAD(Reason.OVERLOAD);

    private final Reason reason;

    FaultKind(Reason reason) { this.reason = reason; }

    public Reason reason() { return reason; }
}
