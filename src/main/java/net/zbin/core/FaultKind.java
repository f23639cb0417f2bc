package net.zbin.core;

/** Why no usable reading exists; each maps to a reason code and is retested, then rejected. */
public enum FaultKind {
    TIMEOUT(Reason.METER_TIMEOUT), GARBLED(Reason.METER_GARBLED), DISCONNECTED(Reason.METER_DISCONNECTED),
    INSTRUMENT_ERROR(Reason.METER_ERROR), OVERLOAD(Reason.OVERLOAD),
    /** The meter refused a test condition (its error queue or a read-back says so): the recipe cannot run here. */
    SETUP_REFUSED(Reason.SETUP_REFUSED);

    private final Reason reason;

    FaultKind(Reason reason) { this.reason = reason; }

    public Reason reason() { return reason; }
}
