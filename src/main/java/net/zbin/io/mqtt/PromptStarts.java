package net.zbin.io.mqtt;

import java.lang.reflect.Field;
import java.util.concurrent.Future;
import java.util.concurrent.ScheduledThreadPoolExecutor;
import org.eclipse.paho.client.mqttv3.internal.CommsCallback;
import org.eclipse.paho.client.mqttv3.internal.CommsReceiver;
import org.eclipse.paho.client.mqttv3.internal.CommsSender;

/**
 * The threads of one Paho client: each task on a thread of its own, as Paho starts them without an executor — with
 * one difference. Paho 1.2.5 starts its receiver, sender and callback holding a lock the new thread takes first, then
 * checks whether the thread runs and, when not yet (nearly always), sleeps 100 ms before it looks again
 * (eclipse-paho/paho.mqtt.java issue 945, open): 0.3 s of every connect and reconnect spent asleep. Handing such a task
 * over here waits on that lock — {@link Object#wait} lets the new thread take it — until the task runs, at most
 * {@link #WAIT_MS}; Paho's first check then finds it running. Where the lock is not found (a Paho other than the one
 * this was written against), the task just starts and Paho sleeps as it would.
 */
final class PromptStarts extends ScheduledThreadPoolExecutor {
    /** The longest a hand-over waits for its thread (Paho's own wait would be 100 ms). */
    static final long WAIT_MS = 50;
    private final String name;
    /** Paho workers handed over found running at once, and those handed over as Paho would (lock not found, or slow). */
    final java.util.concurrent.atomic.AtomicInteger prompt = new java.util.concurrent.atomic.AtomicInteger(),
            plain = new java.util.concurrent.atomic.AtomicInteger();

    PromptStarts(String name) {
        super(1, r -> {
            Thread t = new Thread(r, name + "-scheduled");
            t.setDaemon(true);
            return t;
        });
        this.name = name;
    }

    @Override
    public void execute(Runnable task) { begin(task); }

    /**
     * Runs the task on a thread of its own, as Paho would; what it throws reaches the thread's uncaught-exception handler
     * (a pool's future would keep an {@link OutOfMemoryError} to itself, and the process would live on deaf). The future
     * is what Paho uses of it: {@code cancel(true)} interrupts the thread.
     */
    @Override
    public Future<?> submit(Runnable task) { return begin(task); }

    private Running begin(Runnable paho) {
        Thread t = new Thread(paho, name);
        t.setDaemon(true);
        var running = new Running(t);
        t.start();
        Object lock = lifecycle(paho);
        if (lock == null || !Thread.holdsLock(lock)) {
            if (running(paho) != null) plain.incrementAndGet(); // a Paho worker, its lock not where it was: Paho sleeps as it would
            return running;
        }
        long end = System.nanoTime() + WAIT_MS * 1_000_000L;
        synchronized (lock) {
            try {
                while (running(paho) != Boolean.TRUE && System.nanoTime() < end) lock.wait(1);
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
            }
            (running(paho) == Boolean.TRUE ? prompt : plain).incrementAndGet();
        }
        return running;
    }

    /** A task's thread as a future: done when the thread ended; cancelling interrupts it. */
    private static final class Running implements Future<Void> {
        private final Thread thread;
        private volatile boolean cancelled;

        Running(Thread thread) { this.thread = thread; }

        @Override
        public boolean cancel(boolean interrupt) {
            cancelled = true;
            if (interrupt) thread.interrupt();
            return true;
        }

        @Override
        public boolean isCancelled() { return cancelled; }

        @Override
        public boolean isDone() { return !thread.isAlive(); }

        @Override
        public Void get() throws InterruptedException {
            thread.join();
            return null;
        }

        @Override
        public Void get(long timeout, java.util.concurrent.TimeUnit unit) throws InterruptedException, java.util.concurrent.TimeoutException {
            thread.join(Math.max(1, unit.toMillis(timeout)));
            if (thread.isAlive()) throw new java.util.concurrent.TimeoutException();
            return null;
        }
    }

    /** Whether a Paho worker runs (its own check, the one its starter makes); null for any other task. */
    static Boolean running(Runnable paho) {
        if (paho instanceof CommsReceiver r) return r.isRunning();
        if (paho instanceof CommsSender s) return s.isRunning();
        if (paho instanceof CommsCallback c) return c.isRunning();
        return null;
    }

    /** The lock a Paho worker's starter holds while it hands the worker over, or null. */
    static Object lifecycle(Runnable paho) {
        if (!(paho instanceof CommsReceiver || paho instanceof CommsSender || paho instanceof CommsCallback)) return null;
        try {
            Field f = paho.getClass().getDeclaredField("lifecycle");
            f.setAccessible(true);
            return f.get(paho);
        } catch (ReflectiveOperationException | RuntimeException e) {
            return null;
        }
    }
}
