package net.zbin.app.daemon;

import java.util.ArrayList;
import java.util.List;
import net.zbin.io.mqtt.Payloads;
import net.zbin.io.mqtt.Publisher;

/** Keeps what would have gone to the broker, in order. */
final class RecordingPublisher implements Publisher {
    record Sent(String topic, String payload, int qos, boolean retained) {}

    final List<Sent> sent = new ArrayList<>();

    @Override
    public synchronized void publish(String topic, byte[] payload, int qos, boolean retained) {
        sent.add(new Sent(topic, Payloads.text(payload), qos, retained));
    }

    synchronized List<Sent> on(String topic) { return sent.stream().filter(s -> s.topic().equals(topic)).toList(); }
}
