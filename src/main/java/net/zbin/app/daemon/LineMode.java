package net.zbin.app.daemon;

import java.time.Clock;
import java.time.Instant;
import java.util.Map;
import java.util.concurrent.ConcurrentHashMap;
import java.util.function.Supplier;
import net.zbin.core.AlarmCode;
import net.zbin.io.mqtt.Payloads;
import net.zbin.io.mqtt.Publisher;
import net.zbin.io.mqtt.Topics;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The line's mode — ready, paused (operator, or the record log cannot be written and the line is set
 * to pause then) or fault (meter link down, or the meter refused the recipe's test conditions) — with the retained state message and the alarms that go
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
    private final Map<AlarmCode, Alarm> active = new ConcurrentHashMap<>();
    private final java.util.Set<AlarmCode> pauseOn;
    private final java.nio.file.Path history;
    private volatile Publisher out;
    private final java.util.concurrent.ExecutorService sender = java.util.concurrent.Executors.newSingleThreadExecutor(r -> {
        Thread t = new Thread(r, "line-state");
        t.setDaemon(true);
        return t;
    });
    private boolean operatorPaused, logFailing, linkDown, setupRefused;
    private Mode published = Mode.OFFLINE;
    private Instant since;

    /** An active alarm; {@code ack} null until an operator acknowledges it (it stays active until it clears). */
    record Alarm(AlarmCode code, String message, Instant since, Ack ack) {
        byte[] payload(boolean active) {
            return ack == null ? Payloads.alarm(code.code(), code.severity().key(), active, message, since)
                    : Payloads.alarm(code.code(), code.severity().key(), active, message, since, ack.by(), ack.at(), ack.note());
        }
    }

    /** Who acknowledged an alarm, when, and what they noted (may be empty). */
    record Ack(String by, Instant at, String note) {}

    /** Hears every state and alarm message, in order, on the sender thread (a status page). */
    private volatile java.util.function.BiConsumer<String, byte[]> observer;

    LineMode(Clock clock, Topics topics, boolean pauseOnLogFailure, Supplier<String> recipe) {
        this(clock, topics, pauseOnLogFailure, recipe, java.util.Set.of(), null);
    }

    /**
     * @param pauseOn alarm codes that pause the line while they are active
     * @param history file each raised and cleared alarm is appended to (one JSON object a line), or null
     */
    LineMode(Clock clock, Topics topics, boolean pauseOnLogFailure, Supplier<String> recipe, java.util.Set<AlarmCode> pauseOn,
             java.nio.file.Path history) {
        this.pauseOn = java.util.Set.copyOf(pauseOn);
        this.history = history;
        this.clock = clock;
        this.topics = topics;
        this.pauseOnLogFailure = pauseOnLogFailure;
        this.recipe = recipe;
        this.since = clock.instant();
    }

    /** Alarms are not logged: a scratch line's (the warm-up's), whose alarms are invented and concern no one. */
    private boolean quiet;

    /** This mode logs no alarms (the warm-up's scratch line); returns itself. */
    LineMode quiet() {
        quiet = true;
        return this;
    }

    /** From now on state and alarms go here (until then they are only kept). */
    void attach(Publisher p) { out = p; }

    synchronized Mode mode() {
        if (operatorPaused || (logFailing && pauseOnLogFailure)) return Mode.PAUSED;
        for (AlarmCode c : pauseOn) if (active.containsKey(c)) return Mode.PAUSED;
        if (linkDown || setupRefused) return Mode.FAULT;
        return Mode.READY;
    }

    synchronized boolean linkDown() { return linkDown; }

    synchronized boolean setupRefused() { return setupRefused; }

    /** The meter refused the recipe's test conditions: the line is in fault until a setup is taken. */
    synchronized void setSetupRefused(boolean refused, String message) {
        if (refused == setupRefused) return;
        setupRefused = refused;
        alarm(AlarmCode.METER_SETUP_REFUSED, refused, refused ? message + "; the recipe cannot run on this meter"
                : "the meter took the test conditions", true);
        changed();
    }

    synchronized void setOperatorPaused(boolean p) {
        operatorPaused = p;
        changed();
    }

    synchronized void setLinkDown(boolean down, String message) {
        if (down == linkDown) return;
        linkDown = down;
        alarm(AlarmCode.METER_LINK_DOWN, down, down ? message : "meter link restored", true);
        changed();
    }

    synchronized void setLogFailing(boolean failing, String message) {
        if (failing == logFailing) return;
        logFailing = failing;
        alarm(AlarmCode.RECORD_LOG_FAILED, failing, failing ? message + (pauseOnLogFailure ? "; line paused"
                : "; sorting continues without a record") : "record log writable again", true);
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
        for (Alarm a : active.values()) send(topics.alarm(), a.payload(true), false);
    }

    /** From now on every state and alarm message is also handed to {@code o} (on the sender thread, never the caller's). */
    void observe(java.util.function.BiConsumer<String, byte[]> o) { observer = o; }

    private void send(String topic, byte[] payload, boolean retained) {
        Publisher p = out;
        var o = observer;
        if (p == null && o == null) return;
        try {
            sender.execute(() -> {
                if (p != null) p.publish(topic, payload, 1, retained);
                if (o != null) {
                    try {
                        o.accept(topic, payload);
                    } catch (RuntimeException e) {
                        LOG.warn("status page: {}", e.toString());
                    }
                }
            });
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

    /**
     * Raises or clears an alarm; a repeat of the same state says nothing. {@code record} false while the
     * record log is replayed at start: the alarm is known again, but not written to the history twice.
     */
    synchronized void alarm(AlarmCode code, boolean on, String message, boolean record) {
        Instant when;
        String key = code.code();
        if (on) {
            if (active.containsKey(code)) return;
            when = clock.instant();
            active.put(code, new Alarm(code, message, when, null));
            if (!quiet) LOG.warn("alarm {}: {}", key, message);
        } else {
            Alarm a = active.remove(code);
            if (a == null) return;
            when = a.since();
            if (!quiet) LOG.info("alarm {} cleared: {}", key, message);
        }
        byte[] b = Payloads.alarm(key, code.severity().key(), on, message, when);
        send(topics.alarm(), b, false);
        if (record && history != null) appendHistory(b);
        if (pauseOn.contains(code)) changed();
    }

    private void appendHistory(byte[] payload) {
        try {
            sender.execute(() -> {
                try {
                    java.nio.file.Files.createDirectories(history.getParent());
                    java.nio.file.Files.write(history, (Payloads.text(payload) + "\n").getBytes(java.nio.charset.StandardCharsets.UTF_8),
                            java.nio.file.StandardOpenOption.CREATE, java.nio.file.StandardOpenOption.APPEND);
                } catch (java.io.IOException e) {
                    LOG.warn("alarm history {}: {}", history, e.toString());
                }
            });
        } catch (java.util.concurrent.RejectedExecutionException e) {
            LOG.debug("stopping: alarm history not written");
        }
    }

    Map<AlarmCode, Alarm> activeAlarms() { return Map.copyOf(active); }

    /**
     * An operator acknowledges an active alarm: it stays active (and visible) until its cause clears, now with who
     * acknowledged it, when and their note; the acknowledgement is published and written to the alarm history.
     *
     * @return what was done, for the command's result
     * @throws IllegalArgumentException the alarm is not active
     */
    synchronized String acknowledge(AlarmCode code, String by, String note) {
        Alarm a = active.get(code);
        if (a == null) throw new IllegalArgumentException("alarm " + code.code() + " is not active");
        Alarm acked = new Alarm(code, a.message(), a.since(), new Ack(by, clock.instant(), note == null ? "" : note));
        active.put(code, acked);
        LOG.info("alarm {} acknowledged by {}{}", code.code(), by, note == null || note.isEmpty() ? "" : ": " + note);
        byte[] b = acked.payload(true);
        send(topics.alarm(), b, false);
        if (history != null) appendHistory(b);
        return "alarm " + code.code() + " acknowledged by " + by;
    }

    /** Clears every recipe-bound alarm (the monitor of the new recipe raises again what still holds). */
    synchronized void clearRecipeBound(String why) {
        for (AlarmCode c : AlarmCode.values()) if (c.recipeBound()) alarm(c, false, why, true);
    }

    /** The offline state, for the clean stop (and the Will). */
    byte[] offline() { return Payloads.state(false, Mode.OFFLINE.key(), recipe.get(), clock.instant()); }
}
