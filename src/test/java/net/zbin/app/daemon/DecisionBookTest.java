package net.zbin.app.daemon;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertInstanceOf;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;
import net.zbin.core.ContactCheck;
import net.zbin.core.Decision;
import net.zbin.core.Grade;
import net.zbin.core.Grader;
import net.zbin.core.GradingMode;
import net.zbin.core.GuardBand;
import net.zbin.core.ModelPolicy;
import net.zbin.core.PartType;
import net.zbin.core.PrimaryParam;
import net.zbin.core.Reading;
import net.zbin.core.Reason;
import net.zbin.core.Recipe;
import net.zbin.core.RejectBins;
import net.zbin.core.RetestPolicy;
import net.zbin.core.TestConditions;
import net.zbin.core.Trigger;
import org.junit.jupiter.api.Test;

/** The book answers a repeat only for the same presentation, and never for another part. No broker needed. */
class DecisionBookTest {
    static final Recipe R = new Recipe("t", PartType.CAPACITOR, 100e-9, new TestConditions(1000, 1, "medium", 1), ModelPolicy.DEFAULT,
            PrimaryParam.CS, GradingMode.CONCENTRIC, List.of(new Grade("J", 1, -5, 5)), GuardBand.NONE, null, null,
            new RejectBins(7, 8, 9, 10, 10, 11, 11), new RetestPolicy(2, 0), ContactCheck.DEFAULT, false);

    static Decision decided(long seq, String part, String lot, int attempt) {
        return new Decision(seq, part, lot, Trigger.Kind.PART, "t", Grader.grade(R, new Reading(1000, 1, -1591.5), null, attempt),
                1, false, attempt);
    }

    static Trigger trigger(long seq, String part) { return new Trigger(seq, part, "", Trigger.Kind.PART, -1); }

    @Test
    void sameSeqPartAndLot_withinTheWindow_isARepeat() {
        DecisionBook b = new DecisionBook(5000, 100);
        b.enterLot("L1");
        b.put(decided(3, "P3", "L1", 0), 1000);
        var found = b.find(trigger(3, "P3"), "L1", 5000, 0);
        assertEquals(3, assertInstanceOf(DecisionBook.Repeat.class, found).decision().seq());
    }

    @Test
    void aSeqThatComesBackWithAnotherPart_orAfterTheWindow_isANewPresentation() {
        DecisionBook b = new DecisionBook(5000, 100);
        b.enterLot("L1");
        b.put(decided(0, "P0", "L1", 0), 1000);
        assertTrue(assertInstanceOf(DecisionBook.Fresh.class, b.find(trigger(0, "P9"), "L1", 1001, 0)).reusedSeq(), "handler restarted its counter");
        assertTrue(assertInstanceOf(DecisionBook.Fresh.class, b.find(trigger(0, "P0"), "L1", 6001, 0)).reusedSeq(), "after the window");
        assertTrue(assertInstanceOf(DecisionBook.Fresh.class, b.find(trigger(0, "P0"), "L2", 1001, 0)).reusedSeq(), "another lot");
        assertEquals(3, b.reusedSeqs());
        assertEquals(false, assertInstanceOf(DecisionBook.Fresh.class, b.find(trigger(1, "P1"), "L1", 1001, 0)).reusedSeq());
    }

    @Test
    void aNewLot_startsAFreshBook() {
        DecisionBook b = new DecisionBook(5000, 100);
        b.enterLot("L1");
        b.put(decided(0, "P0", "L1", 0), 1000);
        assertTrue(b.enterLot("L2"));
        assertEquals(0, b.size());
        assertEquals(false, b.enterLot("L2"));
    }

    @Test
    void retest_countsAttemptsOfTheSamePart_only() {
        DecisionBook b = new DecisionBook(5000, 100);
        b.enterLot("L1");
        b.put(decided(4, "P4", "L1", 1), 1000);
        assertEquals(2, b.attemptFor(new Trigger(5, "P4", "", Trigger.Kind.PART, 4), "L1"));
        assertEquals(1, b.attemptFor(new Trigger(5, "P8", "", Trigger.Kind.PART, 4), "L1"), "retest_of names another part");
        assertEquals(1, b.attemptFor(new Trigger(5, "P4", "", Trigger.Kind.PART, 99), "L1"), "unknown earlier presentation");
        assertEquals(0, b.attemptFor(trigger(6, "P6"), "L1"));
    }

    @Test
    void aPartNotMeasured_isMeasuredWhenItsTriggerComesAgain_andItsRetestIsNotCounted() {
        DecisionBook b = new DecisionBook(5000, 100);
        b.enterLot("L1");
        Decision paused = new Decision(2, "P2", "L1", Trigger.Kind.PART, "t", Grader.notMeasured(R, Reason.LINE_PAUSED), 1, false, 0);
        b.put(paused, 1000);
        assertInstanceOf(DecisionBook.Fresh.class, b.find(trigger(2, "P2"), "L1", 1001, 0));
        assertEquals(0, b.attemptFor(new Trigger(3, "P2", "", Trigger.Kind.PART, 2), "L1"));
    }

    @Test
    void aTriggerSentAgainBeforeItsNotMeasuredAnswerWentOut_getsThatAnswerAgain_aStaleOnesCopyJustAfterToo_oneSentLaterIsMeasured() {
        DecisionBook b = new DecisionBook(5000, 100);
        b.enterLot("L1");
        Decision stale = new Decision(2, "P2", "L1", Trigger.Kind.PART, "t", Grader.notMeasured(R, Reason.STALE_TRIGGER), 700, false, 0);
        b.put(stale, 1000, 5_000_000L); // its answer went out at 5 ms (nanoTime)
        // the handler's patience ran out while the line was late: its copy came at 4.9 ms, before the answer went out
        var again = assertInstanceOf(DecisionBook.Repeat.class, b.find(trigger(2, "P2"), "L1", 1001, 4_900_000L));
        assertEquals(Reason.STALE_TRIGGER, again.decision().grading().reason());
        // taken up just after the answer went out (the line was late, the copy likely on its way): still a copy
        long window = DecisionBook.LATE_COPY_NANOS;
        assertInstanceOf(DecisionBook.Repeat.class, b.find(trigger(2, "P2"), "L1", 1001, 5_000_000L + window - 1));
        // taken up a window after the answer went out: presented again, measured
        assertInstanceOf(DecisionBook.Fresh.class, b.find(trigger(2, "P2"), "L1", 1001, 5_000_000L + window));
        // nanoTime may be negative: the order is by difference, not by sign
        b.put(stale, 1000, -5_000_000L - window);
        assertInstanceOf(DecisionBook.Repeat.class, b.find(trigger(2, "P2"), "L1", 1001, -5_000_000L - 1));
        assertInstanceOf(DecisionBook.Fresh.class, b.find(trigger(2, "P2"), "L1", 1001, -5_000_000L));
        // another answer without a reading (the line paused) has no such window: a trigger after it is measured
        Decision paused = new Decision(4, "P4", "L1", Trigger.Kind.PART, "t", Grader.notMeasured(R, Reason.LINE_PAUSED), 1, false, 0);
        b.put(paused, 1000, 5_000_000L);
        assertInstanceOf(DecisionBook.Repeat.class, b.find(trigger(4, "P4"), "L1", 1001, 4_900_000L));
        assertInstanceOf(DecisionBook.Fresh.class, b.find(trigger(4, "P4"), "L1", 1001, 5_000_000L));
        // a measured decision is a repeat whenever its copy came
        b.put(decided(3, "P3", "L1", 0), 1000, 5_000_000L);
        assertInstanceOf(DecisionBook.Repeat.class, b.find(trigger(3, "P3"), "L1", 1001, 5_100_000L));
        // read back from the record log (answered by an earlier process): a trigger now came after it
        b.put(stale, 1000);
        assertInstanceOf(DecisionBook.Fresh.class, b.find(trigger(2, "P2"), "L1", 1001, Long.MIN_VALUE));
    }

    @Test
    void aDecisionPastItsWindow_isAnsweredNoMore_butItsRetestsStillCount_forAMinute() {
        DecisionBook b = new DecisionBook(5000, 100);
        b.enterLot("L1");
        b.put(decided(1, "P1", "L1", 1), 1000);
        b.put(new Decision(2, "P2", "L1", Trigger.Kind.PART, "t", Grader.notMeasured(R, Reason.LINE_PAUSED), 1, false, 0), 1000);
        b.put(decided(3, "P3", "L1", 0), 6000); // 1 and 2 are 5 s old: still within the window
        assertEquals(3, b.withWholeDecision());
        assertInstanceOf(DecisionBook.Repeat.class, b.find(trigger(1, "P1"), "L1", 6000, 0));
        b.put(decided(4, "P4", "L1", 0), 6001); // now past it: kept for retests only
        assertEquals(2, b.withWholeDecision());
        assertEquals(4, b.size());
        // a copy of it is a new presentation, even one stamped before the put that took it past its window
        assertTrue(assertInstanceOf(DecisionBook.Fresh.class, b.find(trigger(1, "P1"), "L1", 5000, 0)).reusedSeq());
        assertEquals(null, b.repeatOf(trigger(1, "P1"), "L1", 5000, 0));
        // its retests count as before: one more than a measured attempt, the same after one not measured
        assertEquals(2, b.attemptFor(new Trigger(5, "P1", "", Trigger.Kind.PART, 1), "L1"));
        assertEquals(1, b.attemptFor(new Trigger(5, "P9", "", Trigger.Kind.PART, 1), "L1"), "retest_of names another part");
        assertEquals(0, b.attemptFor(new Trigger(6, "P2", "", Trigger.Kind.PART, 2), "L1"));
        // a seq put again is answered again within its own window, and goes past it in its turn
        b.put(decided(1, "P1", "L1", 2), 7000);
        assertEquals(2, assertInstanceOf(DecisionBook.Repeat.class, b.find(trigger(1, "P1"), "L1", 7000, 0)).decision().attempt());
        b.put(decided(7, "P7", "L1", 0), 12_001);
        assertEquals(1, b.withWholeDecision());
        // a minute on, gone
        b.put(decided(8, "P8", "L1", 0), 67_001); // over a minute after 1 was put again (7 000)
        assertEquals(1, b.attemptFor(new Trigger(9, "P1", "", Trigger.Kind.PART, 1), "L1"));
        assertEquals(2, b.size()); // 7 (within a minute) and 8
    }

    @Test
    void aSeqPutAgain_doesNotKeepTheDecisionsAfterItsFirstPlaceWhole() {
        DecisionBook b = new DecisionBook(5000, 100);
        b.enterLot("L1");
        b.put(new Decision(1, "P1", "L1", Trigger.Kind.PART, "t", Grader.notMeasured(R, Reason.LINE_PAUSED), 1, false, 0), 0);
        b.put(decided(2, "P2", "L1", 0), 1000);
        b.put(decided(1, "P1", "L1", 0), 5500); // presented again after the pause, measured
        b.put(decided(3, "P3", "L1", 0), 6500); // 2 is now past its window; 1 (put again) and 3 are not
        assertEquals(2, b.withWholeDecision());
        assertInstanceOf(DecisionBook.Repeat.class, b.find(trigger(1, "P1"), "L1", 6500, 0));
        assertTrue(assertInstanceOf(DecisionBook.Fresh.class, b.find(trigger(2, "P2"), "L1", 6500, 0)).reusedSeq());
    }

    @Test
    void theBook_isBoundedByCount() {
        DecisionBook b = new DecisionBook(5000, 10);
        b.enterLot("L1");
        for (int i = 0; i < 1000; i++) b.put(decided(i, "P" + i, "L1", 0), i);
        assertEquals(10, b.size());
    }
}
