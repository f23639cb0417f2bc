package net.zbin.app;

import io.moquette.broker.Server;
import io.moquette.interception.AbstractInterceptHandler;
import java.lang.reflect.Constructor;
import java.lang.reflect.Field;
import java.util.concurrent.BlockingQueue;
import java.util.concurrent.Executors;
import java.util.concurrent.ScheduledExecutorService;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicLong;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Keeps the embedded Moquette 0.17's session loops alive. Each loop is one thread that runs the commands of the sessions
 * hashed to it, and it ends for good at the first command that throws (its {@code run()} catches only interruption), for
 * instance the io.netty IllegalReferenceCountException Moquette raises for an acknowledgement that arrives after an
 * unsubscribe. From then on its queue (1 024 commands) fills and Moquette refuses every message routed to a session on
 * that loop: the subscriber hears nothing and the publisher gets no PUBACK, so a QoS 1 publisher's in-flight window
 * fills ("Too many publishes in progress") while nothing says why.
 *
 * <p>The keeper looks at the loops five times a second and starts a fresh thread on the queue of any loop that ended,
 * with the old thread's name and exception handler, so the queued commands run and the sessions carry on. Each revival
 * is logged with the exception that ended the loop. This reaches into Moquette's internals by reflection (pinned to
 * 0.17 in the POM); if they are not as expected the keeper says so once and does nothing.
 */
final class SessionLoopKeeper extends AbstractInterceptHandler implements AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(SessionLoopKeeper.class);
    private static final long LOOK_EVERY_MS = 200;

    private final java.util.Queue<Throwable> errors = new java.util.concurrent.ConcurrentLinkedQueue<>();
    private final AtomicLong revived = new AtomicLong();
    private final ScheduledExecutorService watch = Executors.newSingleThreadScheduledExecutor(r -> {
        Thread t = new Thread(r, "zbin-embedded-broker-loops");
        t.setDaemon(true);
        return t;
    });
    private Thread[] loops; // the broker's own SessionEventLoop[]: an element set here replaces the loop there
    private BlockingQueue<?>[] queues;
    private Constructor<?> newLoop;

    @Override
    public String getID() { return "zbin-session-loop-keeper"; }

    /** Moquette reports here what ended a loop (not which loop): kept, in order, for the log lines of the revivals. */
    @Override
    public void onSessionLoopError(Throwable error) { errors.add(error); }

    /** Starts watching the loops of a started server. */
    void watch(Server server) {
        try {
            Object postOffice = field(server, "dispatcher");
            Object group = field(postOffice, "sessionLoops");
            loops = (Thread[]) field(group, "sessionExecutors");
            queues = (BlockingQueue<?>[]) field(group, "sessionQueues");
            newLoop = Class.forName("io.moquette.broker.SessionEventLoop").getDeclaredConstructor(BlockingQueue.class);
            newLoop.setAccessible(true);
        } catch (ReflectiveOperationException | RuntimeException e) {
            LOG.warn("embedded broker: cannot watch Moquette's session loops ({}); a loop that fails stays down", e.toString());
            return;
        }
        watch.scheduleWithFixedDelay(this::look, LOOK_EVERY_MS, LOOK_EVERY_MS, TimeUnit.MILLISECONDS);
    }

    /** Session loops started again after one ended, since the broker started. */
    long revived() { return revived.get(); }

    private void look() {
        for (int i = 0; i < loops.length; i++) {
            Thread old = loops[i];
            if (old.isAlive()) continue;
            try {
                Thread fresh = (Thread) newLoop.newInstance(queues[i]);
                fresh.setName(old.getName());
                fresh.setUncaughtExceptionHandler(old.getUncaughtExceptionHandler());
                loops[i] = fresh;
                fresh.start();
                revived.incrementAndGet();
                Throwable why = errors.poll();
                LOG.warn("embedded broker: session loop {} had ended ({}) with {} commands queued; started it again", old.getName(),
                        why == null ? "no exception reported" : why.toString(), queues[i].size());
            } catch (ReflectiveOperationException | RuntimeException e) {
                LOG.warn("embedded broker: could not start session loop {} again: {}", old.getName(), e.toString());
            }
        }
    }

    private static Object field(Object owner, String name) throws ReflectiveOperationException {
        Field f = owner.getClass().getDeclaredField(name);
        f.setAccessible(true);
        return f.get(owner);
    }

    /** Stops watching and waits for a look in progress, so nothing is started once the broker stops its loops. */
    @Override
    public void close() {
        watch.shutdownNow();
        try {
            watch.awaitTermination(5, TimeUnit.SECONDS);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
    }
}
