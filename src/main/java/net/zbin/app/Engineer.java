package net.zbin.app;

import com.fasterxml.jackson.databind.JsonNode;
import java.nio.charset.StandardCharsets;
import java.util.List;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicReference;
import net.zbin.io.Json;
import net.zbin.io.LineConfig;
import net.zbin.io.mqtt.MqttLink;
import net.zbin.io.mqtt.Topics;

/** An engineer's MQTT client: sends one command at a time and waits for its result. */
final class Engineer implements AutoCloseable {
    private final MqttLink link;
    private final Topics topics;
    private final AtomicReference<CompletableFuture<JsonNode>> pending = new AtomicReference<>();

    Engineer(String broker, Topics topics) throws Exception {
        this.topics = topics;
        LineConfig.MqttSettings s = new LineConfig.MqttSettings(broker, topics.root(), "zbin-engineer-" + ProcessHandle.current().pid(),
                null, null, null, null, null, 10);
        link = new MqttLink(s, null, null, List.of(topics.commandResult()), (t, p) -> {
            CompletableFuture<JsonNode> f = pending.get();
            if (f == null) return;
            try {
                f.complete(Json.mapper().readTree(p));
            } catch (java.io.IOException e) {
                f.completeExceptionally(e);
            }
        });
        link.connect(10_000);
        if (!link.awaitSubscribed(10_000)) throw new java.io.IOException("the broker did not acknowledge the subscription to " + topics.commandResult()
                + " within 10 s");
    }

    /** Sends a command and returns "cmd: message" from its result. */
    String command(String json) throws Exception {
        CompletableFuture<JsonNode> f = new CompletableFuture<>();
        pending.set(f);
        link.publish(topics.command(), json.getBytes(StandardCharsets.UTF_8), 1, false);
        JsonNode r = f.get(20, TimeUnit.SECONDS);
        if (!r.path("ok").asBoolean()) throw new UsageException("command " + json + " failed: " + r.path("message").asText());
        return r.path("cmd").asText() + ": " + r.path("message").asText();
    }

    @Override
    public void close() { link.close(); }
}
