package net.zbin.app.daemon;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicIntegerArray;
import net.zbin.io.mqtt.Ack;
import org.junit.jupiter.api.Test;

/**
 * The hand-over holds a message's acknowledgement to the broker only while nothing waits before it: a flood must queue
 * here (and be answered), not at the broker, which sends a client only a few unacknowledged messages at a time and
 * drops what queues beyond its limit.
 */
class DispatchTest {
    @Test
    void onlyAMessageThatFindsNothingWaiting_holdsItsAck_andEveryAckIsSentOnce() throws Exception {
        Dispatch d = new Dispatch("dispatch-test");
        int n = 50;
        AtomicIntegerArray sends = new AtomicIntegerArray(n);
        CountDownLatch release = new CountDownLatch(1), done = new CountDownLatch(n);
        List<Ack> acks = new ArrayList<>();
        Dispatch.Handler blocking = new Dispatch.Handler() {
            public void handle(byte[] p, long at, Ack ack) {
                try {
                    assertTrue(release.await(60, TimeUnit.SECONDS));
                } catch (InterruptedException e) {
                    Thread.currentThread().interrupt();
                }
                done.countDown();
            }

            public Runnable overflow(byte[] p, long at) { return () -> { }; }
        };
        try {
            for (int i = 0; i < n; i++) {
                int k = i;
                Ack a = Ack.of(() -> sends.incrementAndGet(k));
                acks.add(a);
                d.submit(blocking, new byte[] {(byte) i}, a);
                if (!a.held()) a.send(); // as the MQTT link does when the handler returns without holding it
            }
            // the first starts the measuring thread (and waits there), the second finds an empty queue, the rest queue behind it
            assertTrue(acks.get(0).held() && acks.get(1).held(), "the one measured and the one next hold their acknowledgements");
            for (int i = 2; i < n; i++) assertFalse(acks.get(i).held(), "message " + i + " queued behind others: acknowledged at once");
            assertEquals(0, sends.get(0) + sends.get(1), "held until their answers");
            release.countDown();
            assertTrue(done.await(60, TimeUnit.SECONDS));
        } finally {
            release.countDown();
            d.close();
        }
        for (int i = 0; i < n; i++) assertEquals(1, sends.get(i), "message " + i + " acknowledged once");
    }

    @Test
    void aHandlerThatThrows_stillSendsTheHeldAck() throws Exception {
        Dispatch d = new Dispatch("dispatch-throws");
        CountDownLatch sent = new CountDownLatch(1);
        Ack a = Ack.of(sent::countDown);
        Dispatch.Handler failing = new Dispatch.Handler() {
            public void handle(byte[] p, long at, Ack ack) { throw new IllegalStateException("handler failed"); }

            public Runnable overflow(byte[] p, long at) { return () -> { }; }
        };
        try {
            d.submit(failing, new byte[0], a);
            assertTrue(a.held());
            assertTrue(sent.await(60, TimeUnit.SECONDS), "the acknowledgement went out although the handler failed");
        } finally {
            d.close();
        }
    }

    @Test
    void anIdleLine_runsTheMessageOnTheCallersThread_andSendsItsHeldAckOnce() throws Exception {
        Dispatch d = new Dispatch("in-place", 0, System::nanoTime);
        d.runIdleMessagesInPlace(() -> true);
        Thread caller = Thread.currentThread();
        List<Thread> ran = new ArrayList<>();
        AtomicIntegerArray sends = new AtomicIntegerArray(1);
        Ack a = Ack.of(() -> sends.incrementAndGet(0));
        try {
            d.submit(recording(ran, null, true), new byte[0], a);
            assertEquals(List.of(caller), ran, "run in place, before submit returned");
            assertTrue(a.held() && a.sent(), "held for the answer, then sent by the hand-over itself");
            assertEquals(1, sends.get(0));
        } finally {
            d.close();
        }
    }

    /** A message seen by a handler: on which thread, stamped when. */
    private record Seen(String name, Thread thread, long at) {}

    @Test
    void aLongRunInPlace_backdatesTheMessagesRightBehindIt_andKeepsTheNextOffTheCallersThread() throws Exception {
        java.util.concurrent.atomic.AtomicLong clock = new java.util.concurrent.atomic.AtomicLong(1_000_000_000L);
        Dispatch d = new Dispatch("long-run", Dispatch.QUIET_NANOS, clock::get);
        d.runIdleMessagesInPlace(() -> true);
        List<Seen> seen = new java.util.concurrent.CopyOnWriteArrayList<>();
        java.util.concurrent.Semaphore handled = new java.util.concurrent.Semaphore(0);
        java.util.function.Function<Long, Dispatch.Handler> taking = ns -> new Dispatch.Handler() {
            public void handle(byte[] p, long at, Ack ack) {
                seen.add(new Seen(new String(p), Thread.currentThread(), at));
                clock.addAndGet(ns); // the time this message's work takes
                handled.release();
            }

            public Runnable overflow(byte[] p, long at) { return () -> { }; }

            public boolean inPlace() { return true; }
        };
        Thread caller = Thread.currentThread();
        try {
            clock.addAndGet(1_000_000_000L); // the line idle for a second
            long aCame = clock.get();
            d.submit(taking.apply(50_000_000L), "A".getBytes(), Ack.NONE); // a meter that stalls 50 ms
            clock.addAndGet(10_000);
            d.submit(taking.apply(0L), "B".getBytes(), Ack.NONE); // read right after A's run: it waited behind it
            assertTrue(handled.tryAcquire(2, 60, TimeUnit.SECONDS));
            assertEquals(new Seen("A", caller, aCame), seen.get(0), "A ran in place, stamped when it came");
            assertEquals("B", seen.get(1).name());
            assertEquals(aCame, seen.get(1).at(), "B may have waited unseen behind A: its wait counts from A's start");
            assertTrue(seen.get(1).thread() != caller, "after a long message the next goes to the measuring thread");

            awaitIdle(d);
            clock.addAndGet(60_000_000L); // past A's length after its end: a new part at the line's pace
            long cCame = clock.get();
            d.submit(taking.apply(0L), "C".getBytes(), Ack.NONE);
            assertEquals(new Seen("C", caller, cCame), seen.get(2), "B was short and the line idle: C ran in place, stamped when it came");
            clock.addAndGet(10_000);
            long dCame = clock.get();
            d.submit(taking.apply(0L), "D".getBytes(), Ack.NONE); // straight after C: a burst
            assertTrue(handled.tryAcquire(2, 60, TimeUnit.SECONDS));
            assertEquals(dCame, seen.get(3).at(), "behind a short run the stamp is when it came");
            assertTrue(seen.get(3).thread() != caller, "a message straight after another goes through the queue");

            Dispatch.Handler longCommand = new Dispatch.Handler() { // a compensation's readings: on the measuring thread, 5 ms
                public void handle(byte[] p, long at, Ack ack) {
                    clock.addAndGet(5_000_000L);
                    handled.release();
                }

                public Runnable overflow(byte[] p, long at) { return () -> { }; }
            };
            clock.addAndGet(1_000_000_000L);
            d.submit(longCommand, new byte[0], Ack.NONE);
            assertTrue(handled.tryAcquire(1, 60, TimeUnit.SECONDS));
            awaitIdle(d);
            clock.addAndGet(1_000_000_000L);
            d.submit(taking.apply(0L), "F".getBytes(), Ack.NONE);
            assertTrue(handled.tryAcquire(1, 60, TimeUnit.SECONDS));
            assertTrue(seen.get(4).thread() != caller, "the last message took long: the next goes to the measuring thread");
            awaitIdle(d);
            clock.addAndGet(1_000_000_000L);
            d.submit(taking.apply(0L), "G".getBytes(), Ack.NONE);
            assertEquals(caller, seen.get(5).thread(), "the last message was short again: in place");
        } finally {
            d.close();
        }
    }

    @Test
    void aStandStillOfTheProcess_datesTheMessagesTakenUpRightAfterItToItsStart_thenTheLineStampsAgain() throws Exception {
        java.util.concurrent.atomic.AtomicLong clock = new java.util.concurrent.atomic.AtomicLong(1_000_000_000L);
        Dispatch d = new Dispatch("stood-still", Dispatch.QUIET_NANOS, clock::get);
        d.runIdleMessagesInPlace(() -> true);
        StallWatch watch = d.stallWatch();
        List<Seen> seen = new java.util.concurrent.CopyOnWriteArrayList<>();
        java.util.concurrent.Semaphore handled = new java.util.concurrent.Semaphore(0);
        Dispatch.Handler quick = new Dispatch.Handler() {
            public void handle(byte[] p, long at, Ack ack) {
                seen.add(new Seen(new String(p), Thread.currentThread(), at));
                clock.addAndGet(100_000); // an answer without a reading: 0.1 ms
                handled.release();
            }

            public Runnable overflow(byte[] p, long at) { return () -> { }; }

            public boolean inPlace() { return true; }
        };
        try {
            for (int i = 0; i < 100; i++) { // the watch beats on a running process
                clock.addAndGet(StallWatch.BEAT_NANOS);
                watch.beat();
            }
            long lastBeat = clock.get();
            clock.addAndGet(400_000_000L); // the process stands still 0.4 s with messages on the connection
            d.submit(quick, "A".getBytes(), Ack.NONE); // taken up before the watch moves again
            watch.beat();
            clock.addAndGet(1_900_000L);
            d.submit(quick, "A-copy".getBytes(), Ack.NONE); // taken up after the watch saw the stand-still end, within a beat
            awaitIdle(d);
            clock.addAndGet(50_000L);
            d.submit(quick, "C".getBytes(), Ack.NONE); // back to back behind the copy, more than a beat after the end
            awaitIdle(d);
            clock.addAndGet(300_000L);
            long bCame = clock.get();
            d.submit(quick, "B".getBytes(), Ack.NONE); // a handler's answer to one of them: a round trip later
            assertTrue(handled.tryAcquire(4, 60, TimeUnit.SECONDS));
            assertEquals(lastBeat, seen.get(0).at(), "A may have waited since the stand-still began");
            assertEquals(lastBeat, seen.get(1).at(), "so may its copy: it came before A's answer");
            assertEquals(lastBeat, seen.get(2).at(), "and what was taken up back to back behind them");
            assertEquals(bCame, seen.get(3).at(), "a part presented after an answer: stamped when it came");
        } finally {
            d.close();
        }
    }

    @Test
    void aCommand_neverRunsOnTheCallersThread_evenOnAnIdleLine() throws Exception {
        assertTrue(threadThatRan(true, false) != Thread.currentThread(), "a command may hold the line for seconds: never on Paho's thread");
    }

    @Test
    void aLinkWithoutRoom_sendsTheMessageToTheMeasuringThread() throws Exception {
        assertTrue(threadThatRan(false, true) != Thread.currentThread(), "a publish that may wait must not wait on Paho's thread");
    }

    /** The thread one message ran on, on an idle line (quiet time 0) whose link has {@code room}. */
    private static Thread threadThatRan(boolean room, boolean inPlace) throws Exception {
        Dispatch d = new Dispatch("one-message", 0, System::nanoTime);
        d.runIdleMessagesInPlace(() -> room);
        List<Thread> ran = new java.util.concurrent.CopyOnWriteArrayList<>();
        CountDownLatch done = new CountDownLatch(1);
        try {
            d.submit(recording(ran, done, inPlace), new byte[0], Ack.NONE);
            assertTrue(done.await(60, TimeUnit.SECONDS));
            return ran.get(0);
        } finally {
            d.close();
        }
    }

    @Test
    void workHandedOverAndUnfinished_isNeverOvertaken_byAMessageRunInPlace() throws Exception {
        Dispatch d = new Dispatch("order", 0, System::nanoTime);
        d.runIdleMessagesInPlace(() -> true);
        List<Integer> order = new java.util.concurrent.CopyOnWriteArrayList<>();
        CountDownLatch release = new CountDownLatch(1), all = new CountDownLatch(3);
        try {
            assertTrue(d.onMeasuringThread(() -> {
                try {
                    assertTrue(release.await(60, TimeUnit.SECONDS));
                } catch (InterruptedException e) {
                    Thread.currentThread().interrupt();
                }
                order.add(0);
                all.countDown();
            }));
            for (int i = 1; i <= 2; i++) {
                int k = i;
                d.submit(new Dispatch.Handler() {
                    public void handle(byte[] p, long at, Ack ack) {
                        order.add(k);
                        all.countDown();
                    }

                    public Runnable overflow(byte[] p, long at) { return () -> { }; }

                    public boolean inPlace() { return true; }
                }, new byte[0], Ack.NONE);
            }
            assertEquals(List.of(), order, "both messages wait behind the command the measuring thread holds");
            release.countDown();
            assertTrue(all.await(60, TimeUnit.SECONDS));
            assertEquals(List.of(0, 1, 2), order, "in the order they came");
        } finally {
            release.countDown();
            d.close();
        }
    }

    @Test
    void aFullQueue_refusesATask_insteadOfDroppingItSilently() throws Exception {
        Dispatch d = new Dispatch("full");
        CountDownLatch release = new CountDownLatch(1);
        try {
            assertTrue(d.onMeasuringThread(() -> {
                try {
                    assertTrue(release.await(60, TimeUnit.SECONDS));
                } catch (InterruptedException e) {
                    Thread.currentThread().interrupt();
                }
            }));
            boolean refused = false;
            for (int i = 0; i <= Dispatch.QUEUE + 1 && !refused; i++) refused = !d.onMeasuringThread(() -> { });
            assertTrue(refused, "a task beyond the queue is refused, so its caller can say so");
        } finally {
            release.countDown();
            d.close();
        }
    }

    /** Waits (bounded) until what was handed over has finished, the measuring thread's bookkeeping too. */
    private static void awaitIdle(Dispatch d) throws InterruptedException {
        long end = System.nanoTime() + TimeUnit.SECONDS.toNanos(60);
        while (d.handedOver() != 0) {
            assertTrue(System.nanoTime() < end, "the measuring thread did not finish within 60 s");
            Thread.sleep(1);
        }
    }

    private static Dispatch.Handler recording(List<Thread> ran, CountDownLatch done, boolean inPlace) {
        return new Dispatch.Handler() {
            public void handle(byte[] p, long at, Ack ack) {
                ran.add(Thread.currentThread());
                if (done != null) done.countDown();
            }

            public Runnable overflow(byte[] p, long at) { return () -> { }; }

            public boolean inPlace() { return inPlace; }
        };
    }
}
