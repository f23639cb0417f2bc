package net.zbin.io.mqtt;

/**
 * Where the daemon's outbound messages go. The MQTT link is one; tests use an in-memory one, so that
 * modes, the decision book and the figures are tested without a broker.
 */
public interface Publisher {
    /**
     * Publishes one message and never discards it: when the outbound window or the offline buffer is
     * full this waits (back-pressure). Must not be called on the MQTT client's callback thread.
     */
    void publish(String topic, byte[] payload, int qos, boolean retained);
}
