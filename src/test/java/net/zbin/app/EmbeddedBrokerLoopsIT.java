package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.lang.reflect.Field;
import java.lang.reflect.Method;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.Callable;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import org.eclipse.paho.client.mqttv3.IMqttDeliveryToken;
import org.eclipse.paho.client.mqttv3.MqttAsyncClient;
import org.eclipse.paho.client.mqttv3.MqttCallback;
import org.eclipse.paho.client.mqttv3.MqttConnectOptions;
import org.eclipse.paho.client.mqttv3.MqttMessage;
import org.eclipse.paho.client.mqttv3.persist.MemoryPersistence;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * A Moquette session loop ends at the first command that throws. Without the keeper, every message routed to a session on
 * that loop is refused from then on: the subscriber hears nothing and the publisher's QoS 1 window fills with
 * publishes the broker never acknowledges. The fault is injected here as a command that throws on each loop (the
 * failure seen under load was Moquette's own IllegalReferenceCountException on such a loop).
 */
class EmbeddedBrokerLoopsIT {
    private static final int MESSAGES = 50;

    @TempDir
    Path dir;

    @Test
    void sessionLoopEndedByAFailingCommand_isStartedAgain_andMessagesFlowAndAreAcknowledged() throws Exception {
        try (EmbeddedBroker broker = new EmbeddedBroker(dir)) {
            CountDownLatch heard = new CountDownLatch(MESSAGES);
            MqttAsyncClient sub = new MqttAsyncClient(broker.url(), "loops-sub", new MemoryPersistence());
            MqttAsyncClient pub = new MqttAsyncClient(broker.url(), "loops-pub", new MemoryPersistence());
            try {
                MqttConnectOptions o = new MqttConnectOptions();
                o.setCleanSession(true);
                o.setMaxInflight(MESSAGES);
                sub.setCallback(new MqttCallback() {
                    @Override public void connectionLost(Throwable cause) {}
                    @Override public void messageArrived(String topic, MqttMessage m) { heard.countDown(); }
                    @Override public void deliveryComplete(IMqttDeliveryToken token) {}
                });
                // the embedded broker can drop a connection at its CONNECT or SUBSCRIBE under load: dialled again
                net.zbin.sim.BrokerDial.connectAndSubscribe(sub, o, new String[] {"loops/#"}, new int[] {1}, 20_000);
                net.zbin.sim.BrokerDial.connectAndSubscribe(pub, o, new String[0], new int[0], 20_000);

                int loops = failEverySessionLoop(broker);
                // both clients' sessions sit on some loop, and every loop was ended
                List<IMqttDeliveryToken> sent = new ArrayList<>();
                for (int i = 0; i < MESSAGES; i++) sent.add(pub.publish("loops/" + i, ("m" + i).getBytes(), 1, false));

                assertTrue(heard.await(30, TimeUnit.SECONDS), "messages heard after the loops failed: " + (MESSAGES - heard.getCount()) + " of " + MESSAGES);
                for (IMqttDeliveryToken t : sent) t.waitForCompletion(30_000); // each one acknowledged by the broker (throws if not)
                // Paho lowers its in-flight count on its own thread after a token completes: awaited, bounded
                long until = System.nanoTime() + TimeUnit.SECONDS.toNanos(20);
                while (pub.getInFlightMessageCount() > 0 && System.nanoTime() < until) Thread.sleep(20);
                assertEquals(0, pub.getInFlightMessageCount(), "publishes the broker never acknowledged");
                assertEquals(loops, broker.sessionLoopsRevived(), "loops started again");
            } finally {
                if (sub.isConnected()) sub.disconnect().waitForCompletion(5_000);
                sub.close();
                if (pub.isConnected()) pub.disconnect().waitForCompletion(5_000);
                pub.close();
            }
        }
    }

    /** Routes a command that throws to each of the broker's session loops and waits until every one of them ended. */
    private static int failEverySessionLoop(EmbeddedBroker broker) throws Exception {
        Object group = field(field(broker.server(), "dispatcher"), "sessionLoops");
        Object[] threads = (Object[]) field(group, "sessionExecutors");
        Method ordinal = group.getClass().getDeclaredMethod("targetQueueOrdinal", String.class);
        ordinal.setAccessible(true);
        Method route = group.getClass().getDeclaredMethod("routeCommand", String.class, String.class, Callable.class);
        route.setAccessible(true);
        List<Thread> originals = new ArrayList<>();
        for (Object t : threads) originals.add((Thread) t);
        boolean[] hit = new boolean[threads.length];
        for (int k = 0; k < 10_000 && !allTrue(hit); k++) {
            String id = "fault-" + k;
            int i = (int) ordinal.invoke(group, id);
            if (hit[i]) continue;
            hit[i] = true;
            Callable<String> boom = () -> {
                throw new IllegalStateException("injected session loop fault");
            };
            route.invoke(group, id, "injected fault", boom);
        }
        assertTrue(allTrue(hit), "found a session id for every loop");
        for (Thread t : originals) {
            t.join(30_000);
            assertTrue(!t.isAlive(), "the failing command ended loop " + t.getName());
        }
        return threads.length;
    }

    private static boolean allTrue(boolean[] b) {
        for (boolean x : b) if (!x) return false;
        return true;
    }

    private static Object field(Object owner, String name) throws ReflectiveOperationException {
        Field f = owner.getClass().getDeclaredField(name);
        f.setAccessible(true);
        return f.get(owner);
    }
}
