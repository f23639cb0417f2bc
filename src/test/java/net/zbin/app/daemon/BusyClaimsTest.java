package net.zbin.app.daemon;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertSame;

import net.zbin.core.Trigger;
import org.junit.jupiter.api.Test;

class BusyClaimsTest {
    static Trigger t(long seq, String part) { return new Trigger(seq, part, "L1", Trigger.Kind.PART, -1); }

    @Test
    void aCopyBeforeOrJustAfterTheAnswerWentOut_isCovered_oneLater_orOfAnotherPresentation_isNot() {
        BusyClaims b = new BusyClaims(5_000, 100);
        Trigger t = t(4, "P4");
        BusyClaims.Claim c = b.claim(t, "L1", 0);
        assertSame(c, b.copyOf(t, "L1", 10), "the answer has not gone out yet");
        b.answered(c, 1_000, 1);
        assertSame(c, b.copyOf(t, "L1", 999), "came before the answer went out");
        long late = DecisionBook.LATE_COPY_NANOS;
        assertSame(c, b.copyOf(t, "L1", 1_000 + late - 1), "taken up just after the answer went out (the line is late): a copy");
        assertNull(b.copyOf(t, "L1", 1_000 + late), "taken up later: a deliberate new presentation");
        assertNull(b.copyOf(t(4, "other"), "L1", 10), "another part under the same seq");
        assertNull(b.copyOf(t, "L2", 10), "another lot");
        assertNull(b.copyOf(new Trigger(4, "P4", "L1", Trigger.Kind.OPEN, -1), "L1", 10), "another kind");
    }

    @Test
    void claims_areKeptForTheWindowAfterTheirAnswer_thenDropped_andBoundedByCount() {
        BusyClaims b = new BusyClaims(5_000, 3);
        BusyClaims.Claim first = b.claim(t(1, "P1"), "L1", 0);
        b.answered(first, 100, 0);
        b.claim(t(2, "P2"), "L1", 4_000);
        assertNotNull(b.copyOf(t(1, "P1"), "L1", 50), "within the window after its answer");
        b.claim(t(3, "P3"), "L1", 5_001); // the first's answer is older than the window now
        assertNull(b.copyOf(t(1, "P1"), "L1", 50));
        assertEquals(2, b.size());
        for (int i = 10; i < 20; i++) b.claim(t(i, "P" + i), "L1", 5_002);
        assertEquals(3, b.size(), "never more than the capacity");
    }

    @Test
    void aLaterClaimOfTheSameSeq_survivesTheEarliersDrop() {
        BusyClaims b = new BusyClaims(5_000, 100);
        BusyClaims.Claim old = b.claim(t(7, "P7"), "L1", 0);
        b.answered(old, 100, 0);
        BusyClaims.Claim again = b.claim(t(7, "P7b"), "L1", 1_000);
        b.claim(t(8, "P8"), "L1", 6_000); // drops the first claim of seq 7
        assertSame(again, b.copyOf(t(7, "P7b"), "L1", 10));
    }
}
