package net.zbin.io.mqtt;

/** An unusable inbound payload; the message becomes the {@code reason} of a {@code rejected} notice. */
public final class PayloadException extends Exception {
    public PayloadException(String reason) { super(reason); }
}
