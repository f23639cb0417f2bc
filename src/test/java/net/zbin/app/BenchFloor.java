package net.zbin.app;

import java.io.BufferedReader;
import java.io.InputStreamReader;
import java.io.OutputStream;
import java.net.Socket;
import java.nio.charset.StandardCharsets;
import java.util.Map;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.ConcurrentHashMap;
import org.HdrHistogram.Histogram;
import org.eclipse.paho.client.mqttv3.IMqttDeliveryToken;
import org.eclipse.paho.client.mqttv3.MqttAsyncClient;
import org.eclipse.paho.client.mqttv3.MqttCallback;
import org.eclipse.paho.client.mqttv3.MqttException;
import org.eclipse.paho.client.mqttv3.MqttMessage;

/**
 * A benchmark's floor: what any controller on this rig pays per part whatever it does — a bare MQTT echo through the
 * same broker plus one request/response with the meter simulator at zero measurement time, both at the line's pace.
 * Measured in blocks alternating with the line's, so a shared machine's changing load weighs on both.
 */
final class BenchFloor implements AutoCloseable {
    final Histogram echo = new Histogram(60_000_000_000L, 3), meter = new Histogram(60_000_000_000L, 3);
    /**
     * The first echo and the first meter exchange of each block, also in {@link #echo} and {@link #meter}: each comes
     * after seconds in which that client sent nothing (the line's block, or the other half of the floor's), as the
     * line's first decision after a pause does.
     */
    final Histogram firstEcho = new Histogram(60_000_000_000L, 3), firstMeter = new Histogram(60_000_000_000L, 3);
    /**
     * Each block's first echo plus its first meter exchange: the floor's own "first exchange after a pause", to set
     * beside the line's first decision after one against the same p99.
     */
    final Histogram firstExchange = new Histogram(60_000_000_000L, 3);
    /**
     * Each block's exchanges, the i-th echo plus the i-th meter exchange, one histogram per block: the floor's own part
     * by part, to ask of it what a target asks of a line's first decisions (every one of a block within the floor's p99).
     */
    final java.util.List<Histogram> blockExchanges = new java.util.ArrayList<>();
    private final MqttAsyncClient responder, requester;
    private final Map<String, CompletableFuture<Long>> waiting = new ConcurrentHashMap<>();
    private Socket meterSocket;
    private OutputStream meterOut;
    private BufferedReader meterIn;
    private long seq = 1_000_000;

    /** Connects the echo's two clients and warms them with 500 echoes not recorded. */
    BenchFloor(String brokerUrl) throws Exception {
        responder = LineBench.client(brokerUrl, new ConcurrentHashMap<>());
        responder.setCallback(new MqttCallback() {
            public void connectionLost(Throwable t) { }

            public void messageArrived(String topic, MqttMessage m) throws MqttException { responder.publish("bench/resp", m.getPayload(), 1, false); }

            public void deliveryComplete(IMqttDeliveryToken t) { }
        });
        responder.subscribe("bench/req", 1).waitForCompletion(10_000);
        requester = LineBench.client(brokerUrl, waiting, "bench/resp");
        LineBench.paced(requester, waiting, "bench/req", "", 500, LineBench.PACE, seq);
        seq += 500;
    }

    /** Points the meter half at a meter simulator's TCP port (each rig has its own); 500 exchanges back to back warm it. */
    void meterAt(int port) throws Exception {
        closeMeter();
        meterSocket = new Socket("127.0.0.1", port);
        meterSocket.setTcpNoDelay(true);
        meterOut = meterSocket.getOutputStream();
        meterIn = new BufferedReader(new InputStreamReader(meterSocket.getInputStream(), StandardCharsets.US_ASCII));
        LineBench.meterExchanges(meterOut, meterIn, 500, 0, null);
    }

    /** {@code n} echoes and {@code n} meter exchanges as fast as they are answered, not recorded: the floor's code compiled as a warm line's is. */
    void warm(int n) throws Exception {
        LineBench.paced(requester, waiting, "bench/req", "", n, Integer.MAX_VALUE, seq);
        seq += n;
        LineBench.meterExchanges(meterOut, meterIn, n, 0, null);
    }

    /** One block: {@code n} echoes then {@code n} meter exchanges at the line's pace, recorded here. */
    void block(int n) throws Exception { block(n, null, null); }

    /** One block recorded here and also in {@code echoToo} and {@code meterToo} (when not null). */
    void block(int n, Histogram echoToo, Histogram meterToo) throws Exception {
        long[] echoEach = new long[n], meterEach = new long[n];
        Histogram e = LineBench.paced(requester, waiting, "bench/req", "", n, LineBench.PACE, seq, echoEach);
        seq += n;
        Histogram m = new Histogram(60_000_000_000L, 3);
        LineBench.meterExchanges(meterOut, meterIn, n, LineBench.PACE, m, meterEach);
        firstEcho.recordValue(echoEach[0]);
        firstMeter.recordValue(meterEach[0]);
        firstExchange.recordValue(echoEach[0] + meterEach[0]);
        Histogram pairs = new Histogram(60_000_000_000L, 3);
        for (int i = 0; i < n; i++) pairs.recordValue(echoEach[i] + meterEach[i]);
        blockExchanges.add(pairs);
        echo.add(e);
        meter.add(m);
        if (echoToo != null) echoToo.add(e);
        if (meterToo != null) meterToo.add(m);
    }

    /** The floor's p50 or p99, ms: the echo's plus the meter's at that percentile. */
    double ms(double percentile) { return (echo.getValueAtPercentile(percentile) + meter.getValueAtPercentile(percentile)) / 1e6; }

    static double ms(Histogram echo, Histogram meter, double percentile) {
        return (echo.getValueAtPercentile(percentile) + meter.getValueAtPercentile(percentile)) / 1e6;
    }

    /** Back-to-back meter exchanges (not the floor: both threads stay hot and the figure is lower), kept beside it. */
    Histogram meterBackToBack(int n) throws Exception {
        Histogram h = new Histogram(60_000_000_000L, 3);
        LineBench.meterExchanges(meterOut, meterIn, n, 0, h);
        return h;
    }

    private void closeMeter() throws Exception {
        if (meterSocket != null) meterSocket.close();
        meterSocket = null;
    }

    @Override
    public void close() throws Exception {
        closeMeter();
        requester.disconnect().waitForCompletion(5000);
        responder.disconnect().waitForCompletion(5000);
        requester.close();
        responder.close();
    }
}
