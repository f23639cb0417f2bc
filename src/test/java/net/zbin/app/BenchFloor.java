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
 *
 * <p>Beside it, the relayed floor: the same echo whose responder makes the meter exchange before it answers, as a
 * controller must. The two halves of the summed floor are each measured alone, with nothing else moving on the machine;
 * a controller's meter exchange runs while the handler's client, the broker and their acknowledgements of the trigger are
 * still at work on the same cores. The relayed floor pays that overlap, and so tells the rig's share of a part's tail from
 * the controller's.
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
    /** The relayed floor (see the class comment): each relayed echo, and each block's own. */
    final Histogram relayed = new Histogram(60_000_000_000L, 3);
    final java.util.List<Histogram> relayedBlocks = new java.util.ArrayList<>();
    /** Each block's relayed echoes in the order sent (ns): where its slow ones fall, beside the line's. */
    final java.util.List<long[]> relayedEach = new java.util.ArrayList<>();
    /**
     * The same relayed echo with its responder in a process of its own ({@link BenchRelay}, started as zbin's daemon is
     * with the systemd unit's JVM options), for a line whose daemon runs as its own process; empty unless asked for.
     */
    final Histogram relayedProcess = new Histogram(60_000_000_000L, 3);
    final java.util.List<Histogram> relayedProcessBlocks = new java.util.ArrayList<>();
    /** Which relayed floors a bench measures: none (the floor alone), the relay in this JVM, or that and a relay process. */
    enum Relays { NONE, IN_JVM, IN_JVM_AND_PROCESS }

    private final Relays relays;
    private Process relayProcess;
    private final MqttAsyncClient responder, requester;
    /** The responder's own link to the meter simulator, used on its MQTT callback thread (set by {@link #meterAt}). */
    private volatile Socket relaySocket;
    private volatile OutputStream relayOut;
    private volatile BufferedReader relayIn;
    private final Map<String, CompletableFuture<Long>> waiting = new ConcurrentHashMap<>();
    private Socket meterSocket;
    private OutputStream meterOut;
    private BufferedReader meterIn;
    private long seq = 1_000_000;
    private final String brokerUrl;

    /** Connects the echo's two clients and warms them with 500 echoes not recorded; measures no relayed floor. */
    BenchFloor(String brokerUrl) throws Exception { this(brokerUrl, Relays.NONE); }

    /** As {@link #BenchFloor(String)}, measuring the relayed floors {@code relays} names in every block. */
    BenchFloor(String brokerUrl, Relays relays) throws Exception {
        this.relays = relays;
        this.brokerUrl = brokerUrl;
        responder = LineBench.client(brokerUrl, new ConcurrentHashMap<>());
        responder.setCallback(new MqttCallback() {
            public void connectionLost(Throwable t) { }

            public void messageArrived(String topic, MqttMessage m) throws Exception {
                // one meter exchange before the answer, as a controller makes it
                if (topic.equals("bench/relay")) LineBench.meterExchange(relayOut, relayIn);
                responder.publish("bench/resp", m.getPayload(), 1, false);
            }

            public void deliveryComplete(IMqttDeliveryToken t) { }
        });
        responder.subscribe(new String[] {"bench/req", "bench/relay"}, new int[] {1, 1}).waitForCompletion(10_000);
        requester = LineBench.client(brokerUrl, waiting, "bench/resp");
        LineBench.paced(requester, waiting, "bench/req", "", 500, LineBench.PACE, seq);
        seq += 500;
    }

    /**
     * Points the meter half and the relay at a meter simulator's TCP port (each rig has its own); 500 exchanges back to
     * back warm the one, 500 relayed echoes the other.
     */
    void meterAt(int port) throws Exception {
        closeMeter();
        meterSocket = new Socket("127.0.0.1", port);
        meterSocket.setTcpNoDelay(true);
        meterOut = meterSocket.getOutputStream();
        meterIn = new BufferedReader(new InputStreamReader(meterSocket.getInputStream(), StandardCharsets.US_ASCII));
        LineBench.meterExchanges(meterOut, meterIn, 500, 0, null);
        if (relays == Relays.NONE) return;
        Socket r = new Socket("127.0.0.1", port);
        r.setTcpNoDelay(true);
        relayOut = r.getOutputStream();
        relayIn = new BufferedReader(new InputStreamReader(r.getInputStream(), StandardCharsets.US_ASCII));
        relaySocket = r;
        LineBench.paced(requester, waiting, "bench/relay", "", 500, Integer.MAX_VALUE, seq);
        seq += 500;
        if (relays == Relays.IN_JVM_AND_PROCESS) {
            java.util.List<String> cmd = new java.util.ArrayList<>(java.util.List.of(java.nio.file.Path.of(System.getProperty("java.home"), "bin", "java").toString()));
            cmd.addAll(MosquittoAndSystemdFiles.unitJvmOptions(java.nio.file.Path.of("config/systemd/zbin@.service")));
            cmd.addAll(java.util.List.of("-cp", System.getProperty("java.class.path"), BenchRelay.class.getName(), brokerUrl, Integer.toString(port),
                    "bench/relayp", "bench/resp"));
            relayProcess = new ProcessBuilder(cmd).redirectError(ProcessBuilder.Redirect.INHERIT).start();
            String line = new BufferedReader(new InputStreamReader(relayProcess.getInputStream(), StandardCharsets.UTF_8)).readLine();
            if (!"ready".equals(line)) throw new IllegalStateException("the relay process did not start: " + line);
            // Warm, as a floor must be: after 5 000 echoes its compiler was still at work in the measured blocks (p99 4.0 and
            // 4.8 ms in two FreshStartBench runs, against 0.75 and 1.07 after 60 000); -Dzbin.bench.relay.warm for an A/B.
            int warm = Integer.getInteger("zbin.bench.relay.warm", 60_000);
            LineBench.paced(requester, waiting, "bench/relayp", "", warm, Integer.MAX_VALUE, seq);
            seq += warm;
        }
    }

    /** {@code n} echoes, meter exchanges and relayed echoes as fast as they are answered, not recorded: the floor's code compiled as a warm line's is. */
    void warm(int n) throws Exception {
        LineBench.paced(requester, waiting, "bench/req", "", n, Integer.MAX_VALUE, seq);
        seq += n;
        LineBench.meterExchanges(meterOut, meterIn, n, 0, null);
        if (relays == Relays.NONE) return;
        LineBench.paced(requester, waiting, "bench/relay", "", n, Integer.MAX_VALUE, seq);
        seq += n;
    }

    /** One block at the line's pace, recorded here: {@code n} echoes, {@code n} relayed echoes (from each relay measured), {@code n} meter exchanges. */
    void block(int n) throws Exception { block(n, null, null); }

    /** One block recorded here and also in {@code echoToo} and {@code meterToo} (when not null). */
    void block(int n, Histogram echoToo, Histogram meterToo) throws Exception {
        long[] echoEach = new long[n], meterEach = new long[n];
        Histogram e = LineBench.paced(requester, waiting, "bench/req", "", n, LineBench.PACE, seq, echoEach);
        seq += n;
        // the relayed echoes between the two halves: the echo's first still follows the line's block, and the line's next
        // block still follows the meter half, as before the relayed floor was measured
        if (relays != Relays.NONE) {
            long[] each = new long[n];
            Histogram rl = LineBench.paced(requester, waiting, "bench/relay", "", n, LineBench.PACE, seq, each);
            seq += n;
            relayedEach.add(each);
            relayed.add(rl);
            relayedBlocks.add(rl);
        }
        if (relayProcess != null) {
            Histogram rp = LineBench.paced(requester, waiting, "bench/relayp", "", n, LineBench.PACE, seq);
            seq += n;
            relayedProcess.add(rp);
            relayedProcessBlocks.add(rp);
        }
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

    /** The relayed floor's p50 or p99, ms. */
    double relayedMs(double percentile) { return relayed.getValueAtPercentile(percentile) / 1e6; }

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
        if (relaySocket != null) relaySocket.close();
        relaySocket = null;
        if (relayProcess != null) {
            relayProcess.getOutputStream().close();
            if (!relayProcess.waitFor(10, java.util.concurrent.TimeUnit.SECONDS)) relayProcess.destroyForcibly();
        }
        relayProcess = null;
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
