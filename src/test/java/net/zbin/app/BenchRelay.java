package net.zbin.app;

import java.io.BufferedReader;
import java.io.InputStreamReader;
import java.io.OutputStream;
import java.net.Socket;
import java.nio.charset.StandardCharsets;
import org.eclipse.paho.client.mqttv3.IMqttDeliveryToken;
import org.eclipse.paho.client.mqttv3.MqttAsyncClient;
import org.eclipse.paho.client.mqttv3.MqttCallback;
import org.eclipse.paho.client.mqttv3.MqttMessage;
import org.eclipse.paho.client.mqttv3.persist.MemoryPersistence;

/**
 * The least a controller in its own process can do, for a benchmark's floor: on each message of {@code <in>} one
 * request/response with the meter simulator, then the message back on {@code <out>} (QoS 1 both ways, as the line's
 * trigger and decision). Started by {@link BenchFloor} as a process beside the broker, as zbin's daemon is; it prints
 * {@code ready} when subscribed and stops when its standard input closes.
 * Arguments: {@code <broker url> <meter port> <in topic> <out topic>}.
 */
public final class BenchRelay {
    private BenchRelay() {}

    public static void main(String[] args) throws Exception {
        if (args.length != 4) throw new IllegalArgumentException("usage: BenchRelay <broker url> <meter port> <in topic> <out topic>");
        Socket meter = new Socket("127.0.0.1", Integer.parseInt(args[1]));
        meter.setTcpNoDelay(true);
        OutputStream meterOut = meter.getOutputStream();
        BufferedReader meterIn = new BufferedReader(new InputStreamReader(meter.getInputStream(), StandardCharsets.US_ASCII));
        MqttAsyncClient c = new MqttAsyncClient(args[0], "bench-relay-" + ProcessHandle.current().pid(), new MemoryPersistence());
        String out = args[3];
        c.setCallback(new MqttCallback() {
            public void connectionLost(Throwable t) { }

            public void messageArrived(String topic, MqttMessage m) throws Exception {
                LineBench.meterExchange(meterOut, meterIn);
                c.publish(out, m.getPayload(), 1, false);
            }

            public void deliveryComplete(IMqttDeliveryToken t) { }
        });
        c.connect(LineBench.options()).waitForCompletion(10_000);
        c.subscribe(args[2], 1).waitForCompletion(10_000);
        System.out.println("ready");
        System.out.flush();
        while (System.in.read() >= 0) { } // until the bench closes our input
        c.disconnect().waitForCompletion(5000);
        c.close();
        meter.close();
    }
}
