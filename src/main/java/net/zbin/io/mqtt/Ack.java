package net.zbin.io.mqtt;

import java.util.concurrent.atomic.AtomicBoolean;

/**
 * The acknowledgement of one received message to the broker (a QoS 1 message's PUBACK; nothing for QoS 0). Sent once
 * at most, by whichever of {@link #send()}'s callers comes first; sent when the message's handler returns unless the
 * handler {@link #hold held} it, and then by whoever holds it, at the latest when it is done with the message.
 *
 * <p>Why hold it: the answer to a trigger and the trigger's acknowledgement then reach Paho's sender thread together and
 * leave on one wake-up of it instead of two (a thread switch is most of a decision's CPU). An acknowledgement is sent only
 * on the connection its message came on: after a reconnect the broker numbers messages afresh, and an old number would
 * acknowledge another message.
 */
public final class Ack {
    /** For a message that came by no broker (a warm-up's, a test's). */
    public static final Ack NONE = new Ack(null, 0, 0, 0, null);

    private final MqttLink link;
    private final Runnable sender;
    private final int messageId, qos;
    private final long connection;
    private final AtomicBoolean sent = new AtomicBoolean();
    /** Written and read on Paho's callback thread only (by the handler, then by the link when the handler returned). */
    private boolean held;

    Ack(MqttLink link, int messageId, int qos, long connection) { this(link, messageId, qos, connection, null); }

    private Ack(MqttLink link, int messageId, int qos, long connection, Runnable sender) {
        this.link = link;
        this.sender = sender;
        this.messageId = messageId;
        this.qos = qos;
        this.connection = connection;
    }

    /** The handler keeps the acknowledgement, to send later; call only on the thread the handler runs on, before it returns. */
    public void hold() {
        if (this != NONE) held = true; // the shared no-op stays as it is
    }

    /** Whether the handler held it. */
    public boolean held() { return held; }

    /** An acknowledgement that runs {@code sender} when sent (once): for a message that came another way (a test's). */
    public static Ack of(Runnable sender) { return new Ack(null, 0, 0, 0, java.util.Objects.requireNonNull(sender, "sender")); }

    /** Sends it unless it was sent already; from any thread, never blocks, never throws. */
    public void send() {
        if ((link == null && sender == null) || !sent.compareAndSet(false, true)) return;
        if (link != null) link.acknowledge(messageId, qos, connection);
        else sender.run();
    }

    /** True once {@link #send()} was called (whether or not the connection was still there to carry it). */
    public boolean sent() { return (link == null && sender == null) || sent.get(); }
}
