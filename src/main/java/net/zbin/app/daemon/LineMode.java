package net.zbin.app.daemon;

import java.time.Clock;
import java.time.Instant;
import java.util.Map;
import java.util.concurrent.ConcurrentHashMap;
import java.util.function.Supplier;
import net.zbin.io.mqtt.Payloads;
import net.zbin.io.mqtt.Publisher;
import net.zbin.io.mqtt.Topics;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The line's mode — ready, paused (operator, or the record log cannot be written and the line is set
 * to pause then) or fault (meter link down) — with the retained state message and the alarms that go
 * with it. Thread-safe: the measuring thread, the record-log timer and the MQTT client's thread use it.
 * State and alarm messages are handed, in order, to one sender thread, so no caller ever waits on the
 * broker while it holds the mode, and the MQTT client's own thread never waits at all.
 */
final class LineMode {
    private static final Logger LOG = LoggerFactory.getLogger(LineMode.class);

    private final Clock clock;
    private final Topics topics;
    private final boolean pauseOnLogFailure;
    private final Supplier<String> recipe;
    private final Map<String, Alarm> active = new ConcurrentHashMap<>();
    private volatile Publisher out;
    private final java.util.concurrent.ExecutorService sender = java.util.concurrent.Executors.newSingleThreadExecutor(r -> {
        Thread t = new Thread(r, "line-state");
        t.setDaemon(true);
        return t;
    });
    private boolean operatorPaused, logFailing, linkDown;
    private Mode published = Mode.OFFLINE;
    private Instant since;

    record Alarm(String code, String severity, String message, Instant since) {}

    LineMode(Clock clock, Topics topics, boolean pauseOnLogFailure, Supplier<String> recipe) {
        this.clock = clock;
        this.topics = topics;
        this.pauseOnLogFailure = pauseOnLogFailure;
        this.recipe = recipe;
        this.since = clock.instant();
    }

    /** From now on state and alarms go here (until then they are only kept). */
    void attach(Publisher p) { out = p; }

    synchronized Mode mode() {
        if (operatorPaused || (logFailing && pauseOnLogFailure)) return Mode.PAUSED;
        if (linkDown) return Mode.FAULT;
        return Mode.READY;
    }

    synchronized boolean linkDown() { return linkDown; }

    synchronized void setOperatorPaused(boolean p) {
        operatorPaused = p;
        changed();
    }

    synchronized void setLinkDown(boolean down, String message) {
        if (down == linkDown) return;
        linkDown = down;
        alarm("meter-link-down", "critical", down, down ? message : "meter link restored");
        changed();
    }

    synchronized void setLogFailing(boolean failing, String message) {
        if (failing == logFailing) return;
        logFailing = failing;
        alarm("record-log-failed", "critical", failing, failing ? message + (pauseOnLogFailure ? "; line paused"
                : "; sorting continues without a record") : "record log writable again");
        changed();
    }

    /** Publishes the state when the mode changed. */
    private void changed() {
        Mode m = mode();
        if (m == published) return;
        since = clock.instant();
        publishState();
    }

    /** The state message now (also after a recipe change). */
    synchronized void publishState() {
        Mode m = mode();
        published = m;
        send(topics.state(), Payloads.state(true, m.key(), recipe.get(), since), true);
    }

    /** After a (re)connect: the state and every active alarm again. */
    synchronized void announce() {
        publishState();
        for (Alarm a : active.values()) send(topics.alarm(), Payloads.alarm(a.code(), a.severity(), true, a.message(), a.since()), false);
    }

    private void send(String topic, byte[] payload, boolean retained) {
        Publisher p = out;
        if (p == null) return;
        try {
            sender.execute(() -> p.publish(topic, payload, 1, retained));
        } catch (java.util.concurrent.RejectedExecutionException e) {
            LOG.debug("stopping: {} not sent", topic);
        }
    }

    /** Lets every queued state and alarm message go out, then stops the sender. */
    void drain(long timeoutMs) {
        sender.shutdown();
        try {
            sender.awaitTermination(timeoutMs, java.util.concurrent.TimeUnit.MILLISECONDS);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
    }

    /** Raises or clears an alarm; a repeat of the same state says nothing. */
    synchronized void alarm(String code, String severity, boolean on, String message) {
        Instant when;
        if (on) {
            if (active.containsKey(code)) return;
            when = clock.instant();
            active.put(code, new Alarm(code, severity, message, when));
            LOG.warn("alarm {}: {}", code, message);
        } else {
            Alarm a = active.remove(code);
            if (a == null) return;
            when = a.since();
            LOG.info("alarm {} cleared: {}", code, message);
        }
        send(topics.alarm(), Payloads.alarm(code, severity, on, message, when), false);
    }

    Map<String, Alarm> activeAlarms() { return Map.copyOf(active); }

    /** The offline state, for the clean stop (and the Will). */
    byte[] offline() { return Payloads.state(false, Mode.OFFLINE.key(), recipe.get(), clock.instant()); }
}
