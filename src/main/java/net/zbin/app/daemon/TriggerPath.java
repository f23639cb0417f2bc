package net.zbin.app.daemon;

import java.time.Clock;
import java.util.List;
import net.zbin.core.Decision;
import net.zbin.core.FaultKind;
import net.zbin.core.Grader;
import net.zbin.core.Grading;
import net.zbin.core.PartSession;
import net.zbin.core.Reason;
import net.zbin.core.Recipe;
import net.zbin.core.Trigger;
import net.zbin.io.DecisionFields;
import net.zbin.io.LineConfig;
import net.zbin.io.RecordLog;
import net.zbin.io.meter.MeterException;
import net.zbin.io.meter.MeterReading;
import net.zbin.io.meter.MeterSession;
import net.zbin.io.mqtt.Ack;
import net.zbin.io.mqtt.PayloadException;
import net.zbin.io.mqtt.Payloads;
import net.zbin.io.mqtt.Publisher;
import net.zbin.io.mqtt.Topics;
import net.zbin.io.mqtt.TriggerCodec;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * One trigger, start to end, on the measuring thread: decode, answer a repeat from the book, measure,
 * grade, write the record row through to the operating system, publish the decision, tell the
 * listeners. The row is written before the publish, so every decision the handler gets has its row
 * even after a kill -9; the fsync is the record log's own timer, off this path.
 */
final class TriggerPath {
    private static final Logger LOG = LoggerFactory.getLogger(TriggerPath.class);

    private final LineConfig cfg;
    private final Topics topics;
    private final LineSetup setup;
    private final MeterSession meter;
    private final Publisher out;
    private final RecordLog records;
    private final LineMode mode;
    private final LineStats stats;
    private final DecisionBook book;
    private final List<DecisionListener> listeners;
    private final Clock clock;
    private String lastReusedWarning = null;
    private volatile java.util.function.Consumer<LineStats.Ended> lotEnded = e -> { };
    /** A new lot's start, entered by a trigger and run once that trigger's answer is out (measuring thread only). */
    private Runnable lotStart;
    private final Runnable startPendingLot = this::startPendingLot;
    /**
     * The repeat window's clock: monotonic milliseconds, so a step of the wall clock neither re-measures a re-sent
     * trigger nor keeps every decision "inside the window".
     */
    private final java.util.function.LongSupplier monoMs = () -> System.nanoTime() / 1_000_000L;
    /**
     * Triggers answered {@code line-busy} from the overflow thread: a copy that came before that answer went out is not
     * measured (see {@link BusyClaims}). As many as both queues hold: the overflow queue's claims still waiting for their
     * answer, and as many answered ones as the work queue can hold copies of.
     */
    private final BusyClaims busyClaims;
    /** Decisions read back at start that may still be repeated; put into the book when the read-back ends. */
    private final java.util.ArrayDeque<net.zbin.core.DecisionEvent> readBack = new java.util.ArrayDeque<>();

    TriggerPath(LineConfig cfg, Topics topics, LineSetup setup, MeterSession meter, Publisher out, RecordLog records,
                LineMode mode, LineStats stats, DecisionBook book, List<DecisionListener> listeners, Clock clock) {
        this.cfg = cfg;
        this.topics = topics;
        this.setup = setup;
        this.meter = meter;
        this.out = out;
        this.records = records;
        this.mode = mode;
        this.stats = stats;
        this.book = book;
        this.listeners = List.copyOf(listeners);
        this.clock = clock;
        this.busyClaims = new BusyClaims(cfg.repeatWindowMs(), Dispatch.OVERFLOW + Dispatch.QUEUE);
    }

    void onTrigger(byte[] payload, long arrivedNanos) { onTrigger(payload, arrivedNanos, Ack.NONE); }

    /** @param ack the trigger's acknowledgement to the broker: sent right after its answer's publish (if it was held) */
    void onTrigger(byte[] payload, long arrivedNanos, Ack ack) {
        Trigger t = decode(payload);
        if (t == null) return;
        String lotId = lotOf(t);
        long now = monoMs.getAsLong();
        DecisionBook.Lookup found = book.find(t, lotId, now, arrivedNanos);
        if (found instanceof DecisionBook.Repeat r) {
            answerAgain(r.decision(), ack);
            return;
        }
        BusyClaims.Claim busy = busyClaims.copyOf(t, lotId, arrivedNanos);
        if (busy != null) { // the handler sent it again before it heard line-busy, which it then acts on: line-busy again
            answerAgain(busyDecision(busy.trigger, busy.lot, arrivedNanos), ack); // the same answer, with this copy's wait
            return;
        }
        if (((DecisionBook.Fresh) found).reusedSeq()) seqReused(t, lotId);
        int attempt = book.attemptFor(t, lotId);
        Recipe r = setup.recipe();
        Grading g = decide(t, r, attempt, arrivedNanos);
        Decision d = new Decision(t.seq(), t.part(), lotId, t.kind(), r.name(), g, (System.nanoTime() - arrivedNanos) / 1e6, false, attempt);
        Delivered answered = deliver(new net.zbin.core.DecisionEvent(clock.instant(), cfg.line(), d), ack, startPendingLot);
        book.put(answered.decision(), now, answered.publishedNanos());
    }

    /** A presentation's answer sent again ({@code repeat: true}): no reading, no row. */
    private void answerAgain(Decision d, Ack ack) {
        publishRepeat(d);
        ack.send();
        startPendingLot();
    }

    /** {@code d} sent again ({@code repeat: true}), no row; any thread (the overflow thread's repeats touch nothing else). */
    private void publishRepeat(Decision d) {
        out.publish(topics.decision(), Payloads.bytes(DecisionFields.json(d.asRepeat())), 1, false);
        stats.repeated();
    }

    /**
     * The work queue is full, so the part is not measured; the handler hears so from the overflow thread.
     * Decodes on the caller's thread and returns the answer to send later: {@code line-busy} for a trigger, the
     * rejection for a malformed one. Holds only the decoded trigger (at most a few hundred bytes) while it waits.
     */
    Runnable busy(byte[] payload, long arrivedNanos) {
        Trigger t;
        try {
            t = TriggerCodec.decode(payload);
        } catch (PayloadException e) {
            String why = e.getMessage();
            return () -> reject(topics.trigger(), why);
        }
        String lot = t.lot().isEmpty() ? book.lot() : t.lot();
        // a copy of a presentation answered already, or claimed for line-busy before, that is itself beyond the full
        // queue: that answer again, after the answers waiting before it, with no claim or row of its own
        DecisionBook.Repeat answered = book.repeatOf(t, lot, monoMs.getAsLong(), arrivedNanos);
        if (answered != null) return () -> publishRepeat(answered.decision());
        BusyClaims.Claim earlier = busyClaims.copyOf(t, lot, arrivedNanos);
        if (earlier != null) return () -> publishRepeat(busyDecision(earlier.trigger, earlier.lot, arrivedNanos));
        // claimed here, on Paho's thread, before it hands on the next message: a copy of this trigger finds the claim
        BusyClaims.Claim c = busyClaims.claim(t, lot, monoMs.getAsLong());
        return () -> answerBusy(c, arrivedNanos);
    }

    private void answerBusy(BusyClaims.Claim c, long arrivedNanos) {
        stats.busy();
        Delivered answered = deliver(new net.zbin.core.DecisionEvent(clock.instant(), cfg.line(), busyDecision(c.trigger, c.lot, arrivedNanos)),
                Ack.NONE, null);
        busyClaims.answered(c, answered.publishedNanos(), monoMs.getAsLong());
    }

    private Decision busyDecision(Trigger t, String lot, long arrivedNanos) {
        Recipe r = setup.recipe();
        return new Decision(t.seq(), t.part(), lot, t.kind(), r.name(), Grader.notMeasured(r, Reason.LINE_BUSY),
                (System.nanoTime() - arrivedNanos) / 1e6, false, 0);
    }

    /**
     * The decision the handler got, and when it was handed to the MQTT client to go out (System.nanoTime, taken just
     * before the publish): a trigger that arrived before then was sent without the handler having heard this answer; one
     * after it may be the handler's reaction to it (taken after the publish, behind the listeners, a loaded machine let a
     * handler's deliberate new presentation arrive "before" it and be answered as a copy).
     */
    record Delivered(Decision decision, long publishedNanos) {}

    /**
     * Records, publishes and tells the listeners; returns the decision the handler got and when it went out. A measured decision whose
     * row did not reach the operating system is not published as it is (unless the line is set to sort on without
     * a record): the handler gets {@code retest} / {@code record-failed} instead, so the log holds every bin the
     * handler acted on, and that answer's row is kept for when the log is writable again. The trigger's {@code ack} goes
     * right after the publish (the two leave on one turn of the MQTT client's sender); {@code afterPublish} (or null)
     * runs between the publish and the listeners.
     */
    private synchronized Delivered deliver(net.zbin.core.DecisionEvent e, Ack ack, Runnable afterPublish) {
        if (!records.write(e)) {
            Decision d = e.decision();
            if (cfg.records().pauseOnFailure() && d.grading().reason().kind() != Reason.Kind.NOT_MEASURED) {
                d = new Decision(d.seq(), d.part(), d.lot(), d.kind(), d.recipe(), Grader.notMeasured(setup.recipe(), Reason.RECORD_FAILED),
                        d.latencyMs(), false, d.attempt());
                e = new net.zbin.core.DecisionEvent(e.time(), e.line(), d);
            }
            records.keep(e);
        }
        byte[] payload = Payloads.bytes(DecisionFields.json(e.decision()));
        long publishedNanos = System.nanoTime();
        out.publish(topics.decision(), payload, 1, false);
        ack.send();
        if (afterPublish != null) afterPublish.run();
        for (DecisionListener l : listeners) {
            try {
                l.decided(e);
            } catch (RuntimeException ex) {
                LOG.error("decision listener failed", ex);
            }
        }
        return new Delivered(e.decision(), publishedNanos);
    }

    private Trigger decode(byte[] payload) {
        try {
            return TriggerCodec.decode(payload);
        } catch (PayloadException e) {
            reject(topics.trigger(), e.getMessage());
            return null;
        }
    }

    void reject(String topic, String reason) {
        stats.rejected();
        out.publish(topics.rejected(), Payloads.rejected(topic, reason), 1, false);
    }

    /**
     * The trigger's lot, or the line's. A lot different from the book's starts a fresh book at once (the trigger is
     * looked up in the new lot's); the finished lot's last figures and the new lot's start are taken after this
     * trigger's answer was published ({@link #lotStart}), so the first part of a lot waits on no bookkeeping.
     */
    private String lotOf(Trigger t) {
        String l = t.lot().isEmpty() ? book.lot() : t.lot();
        if (l.equals(book.lot())) return l;
        startPendingLot(); // a lot whose first trigger got no answer (it failed on the way) still starts, and ends, in order
        boolean ended = !book.lot().isEmpty();
        java.time.Instant when = clock.instant();
        book.enterLot(l);
        lastReusedWarning = null;
        lotStart = () -> {
            LineStats.Ended e = stats.startLot(l, when);
            if (ended) lotEnded.accept(e);
        };
        return l;
    }

    /** Runs the lot start a trigger of a new lot left for after its answer; before the listeners hear of that answer. */
    private void startPendingLot() {
        Runnable r = lotStart;
        if (r == null) return;
        lotStart = null;
        r.run();
    }

    /**
     * Runs on the measuring thread when a lot ended (another started), with the figures it ended with, before the
     * listeners hear of the new lot's first decision. Must be quick: it is on the trigger path.
     */
    void onLotEnd(java.util.function.Consumer<LineStats.Ended> r) { lotEnded = r; }

    /** The {@code lot} command or a lot found in the record log at start: the lot's figures start now. */
    void enterLot(String l, java.time.Instant when) {
        startPendingLot();
        boolean ended = !l.equals(book.lot()) && !book.lot().isEmpty();
        if (book.enterLot(l)) {
            LineStats.Ended e = stats.startLot(l, when);
            if (ended) lotEnded.accept(e);
            lastReusedWarning = null;
        }
    }

    private void seqReused(Trigger t, String lotId) {
        stats.seqReused();
        if (!lotId.equals(lastReusedWarning)) {
            lastReusedWarning = lotId;
            LOG.warn("lot '{}': seq {} came back as another presentation (part '{}'): measured as new; "
                    + "the handler reuses seqs (counted as seq_reused on the dashboard, logged once per lot)", lotId, t.seq(), t.part());
        }
    }

    /**
     * Measures and grades, unless the line is paused or the trigger waited longer than the handler's deadline:
     * by then the handler may have moved another part onto the contacts, so that seq's answer must not be a reading.
     * The wait is checked again right before each reading is asked for: setting the meter's conditions, or the process
     * standing still, may have taken it past the deadline since.
     */
    private Grading decide(Trigger t, Recipe r, int attempt, long arrivedNanos) {
        if (mode.mode() == Mode.PAUSED) return Grader.notMeasured(r, Reason.LINE_PAUSED);
        if (System.nanoTime() - arrivedNanos > cfg.deadlineMs() * 1_000_000L) return Grader.notMeasured(r, Reason.STALE_TRIGGER);
        Recipe[] plan = setup.plan();
        PartSession session = new PartSession(plan[0] == r ? plan : PartSession.plan(r), cfg.checks(), t.kind(), setup.compensation(),
                setup::compensationAt, attempt);
        long deadlineNanos = cfg.deadlineMs() * 1_000_000L;
        Grading g;
        try {
            do {
                meter.apply(session.conditions()); // sends nothing while the conditions stay; a later step's are set before its reading
                long t0 = System.nanoTime();
                if (t0 - arrivedNanos > deadlineNanos) return Grader.notMeasured(r, Reason.STALE_TRIGGER);
                MeterReading mr = meter.measure();
                long now = System.nanoTime();
                // another reading fits when, at twice this one's time, it still ends inside the handler's deadline
                g = session.offer(mr.reading(), now - arrivedNanos + 2 * (now - t0) < deadlineNanos);
            } while (g == null);
        } catch (MeterException e) {
            LOG.debug("seq {}: {}", t.seq(), e.getMessage());
            if (e.kind() == FaultKind.SETUP_REFUSED) mode.setSetupRefused(true, e.getMessage());
            if (e.kind() == FaultKind.DISCONNECTED) {
                boolean wasDown = mode.linkDown();
                mode.setLinkDown(true, e.getMessage());
                if (wasDown) return Grader.notMeasured(r, Reason.LINE_FAULT);
            }
            return Grader.fault(r, e.kind(), attempt);
        }
        if (mode.linkDown()) mode.setLinkDown(false, null);
        if (mode.setupRefused()) mode.setSetupRefused(false, null);
        return g;
    }

    /** Puts back what the record log says was decided before a restart: the lot's figures now, the book at {@link #readBackDone}. */
    void recovered(net.zbin.core.DecisionEvent e) {
        enterLot(e.decision().lot(), e.time());
        forBook(e);
        for (DecisionListener l : listeners) l.decided(e);
    }

    /**
     * A row the figures already hold (a read-back checkpoint's): only kept for the book, if it is in the last repeat
     * window at {@link #readBackDone}.
     */
    void forBook(net.zbin.core.DecisionEvent e) {
        Decision d = e.decision();
        if (!readBack.isEmpty() && !readBack.peekLast().decision().lot().equals(d.lot())) readBack.clear();
        readBack.add(e);
        while (readBack.size() > 20_000 || e.time().toEpochMilli() - readBack.peekFirst().time().toEpochMilli() > cfg.repeatWindowMs())
            readBack.pollFirst();
    }

    /** The book's lot as a read-back checkpoint has it (the figures' lot is in the figures' state). */
    void checkpointLot(String lot) { book.enterLot(lot); }

    /**
     * {@code s}'s result, taken between two decisions with every row written also heard by the listeners (the lock
     * {@link #deliver} holds); null while a new lot's start waits for its first answer.
     */
    synchronized <T> T settled(java.util.function.Supplier<T> s) { return lotStart == null ? s.get() : null; }

    /** The book's lot. */
    String lot() { return book.lot(); }

    /**
     * The read-back ended: the decisions of the last repeat window of the log go into the book with the ages they had
     * when the daemon stopped, so the time it was down does not shorten their window (a redelivered trigger of an
     * answered presentation is answered again, not measured again). Returns how many.
     */
    int readBackDone() {
        int n = 0;
        if (!readBack.isEmpty()) {
            long last = readBack.peekLast().time().toEpochMilli(), now = monoMs.getAsLong();
            for (net.zbin.core.DecisionEvent e : readBack) {
                if (!e.decision().lot().equals(book.lot())) continue;
                book.put(e.decision(), now - (last - e.time().toEpochMilli()));
                n++;
            }
        }
        readBack.clear();
        return n;
    }
}
