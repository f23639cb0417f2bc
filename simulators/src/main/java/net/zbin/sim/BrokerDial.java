package net.zbin.sim;

import org.eclipse.paho.client.mqttv3.MqttAsyncClient;
import org.eclipse.paho.client.mqttv3.MqttConnectOptions;
import org.eclipse.paho.client.mqttv3.MqttException;

/**
 * Connects a client and subscribes it as one step, dialling again when the broker drops the connection on the way.
 *
 * <p>A broker that has just bound its port, or one under load (the embedded Moquette), can drop a connection at its
 * CONNECT or at the SUBSCRIBE that follows the CONNACK; a client that then publishes would fail with "connection lost"
 * although nothing is wrong with what it does. Any other error is thrown at once.
 */
public final class BrokerDial {
    /** How often a dropped connection is dialled again before the error is thrown. */
    public static final int ATTEMPTS = 5;

    private BrokerDial() {}

    /**
     * Connects with {@code options} and subscribes to {@code filters} at {@code qos}, each step waiting up to
     * {@code timeoutMs}; with no filters it only connects.
     */
    public static void connectAndSubscribe(MqttAsyncClient client, MqttConnectOptions options, String[] filters, int[] qos,
                                           long timeoutMs) throws MqttException, InterruptedException {
        for (int attempt = 1; ; attempt++) {
            try {
                client.connect(options).waitForCompletion(timeoutMs);
                if (filters.length > 0) client.subscribe(filters, qos).waitForCompletion(timeoutMs);
                return;
            } catch (MqttException e) {
                if (!dropped(e) || attempt >= ATTEMPTS) throw e;
                if (client.isConnected()) client.disconnectForcibly(0, 1000);
                Thread.sleep(200L * attempt);
            }
        }
    }

    /** True when the broker closed or refused the connection, as opposed to a refusal the client earned. */
    static boolean dropped(MqttException e) {
        int code = e.getReasonCode();
        return code == MqttException.REASON_CODE_CONNECTION_LOST
                || code == MqttException.REASON_CODE_SERVER_CONNECT_ERROR
                || code == MqttException.REASON_CODE_CLIENT_NOT_CONNECTED;
    }
}
