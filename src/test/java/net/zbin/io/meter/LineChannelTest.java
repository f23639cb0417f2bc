package net.zbin.io.meter;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.charset.StandardCharsets;
import java.util.ArrayDeque;
import java.util.Deque;
import net.zbin.core.FaultKind;
import org.junit.jupiter.api.Test;

/** Framing alone, over a scripted link: how the bytes are cut into reads must not matter. */
class LineChannelTest {
    /** A scripted meter: {@link #whole}/{@link #bytewise} arrive now (unasked), {@link #answer} after the next write. */
    static final class Script implements Transport {
        final Deque<byte[]> chunks = new ArrayDeque<>();
        final Deque<java.util.List<byte[]>> answers = new ArrayDeque<>();
        public void open() { }
        public boolean isOpen() { return true; }
        public void write(byte[] d) { if (!answers.isEmpty()) chunks.addAll(answers.poll()); }
        public int available() { return chunks.isEmpty() ? 0 : chunks.peek().length; }
        public int read(byte[] b, int t) {
            byte[] c = chunks.poll();
            if (c == null) return 0;
            System.arraycopy(c, 0, b, 0, c.length);
            return c.length;
        }
        public String describe() { return "script"; }
        public void close() { }

        void bytewise(String s) { for (byte x : s.getBytes(StandardCharsets.US_ASCII)) chunks.add(new byte[] {x}); }
        void whole(String s) { chunks.add(s.getBytes(StandardCharsets.US_ASCII)); }
        void answer(String s) { answers.add(java.util.List.of(s.getBytes(StandardCharsets.US_ASCII))); }
        void answerBytewise(String s) {
            java.util.List<byte[]> l = new java.util.ArrayList<>();
            for (byte x : s.getBytes(StandardCharsets.US_ASCII)) l.add(new byte[] {x});
            answers.add(l);
        }
    }

    @Test
    void terminatorSplitAcrossReads_isFramedAsOneLine() throws Exception {
        Script link = new Script();
        LineChannel ch = new LineChannel(link, "\r\n");
        link.answerBytewise("1.5,-2.5,GOOD\r\n");
        assertEquals("1.5,-2.5,GOOD", ch.query("Q", 100));
        link.answer("first,1");
        link.answerBytewise(",GOOD\r");
        assertEquals(FaultKind.TIMEOUT, assertThrows(MeterException.class, () -> ch.query("Q", 20)).kind(), "no terminator yet");
    }

    @Test
    void aLineThatCameUnasked_isDroppedBeforeTheNextQuery_andCounted() throws Exception {
        Script link = new Script();
        LineChannel ch = new LineChannel(link, "\n");
        link.whole("1000,0.01,GOOD\n"); // a stray line: nobody asked
        link.answer("47000,0.01,GOOD\n");
        assertEquals("47000,0.01,GOOD", ch.query("TRIG:RX?", 20), "the answer to this query, not the stray line before it");
        assertEquals(15, ch.unaskedBytes());
    }

    @Test
    void dataBehindAReply_failsTheReplyAsGarbled() {
        Script link = new Script();
        LineChannel ch = new LineChannel(link, "\n");
        link.answer("47000,0.01,GOOD\n1000,0.01,GOOD\n");
        MeterException e = assertThrows(MeterException.class, () -> ch.failIfMoreFollows("TRIG:RX?", ch.query("TRIG:RX?", 20)));
        assertEquals(FaultKind.GARBLED, e.kind());
        assertTrue(ch.dirty(), "out of step until settled");
    }

    @Test
    void aConfirmedQuery_refusesAReplyNotFollowedByTheSyncAnswer() throws Exception {
        Script link = new Script();
        LineChannel ch = new LineChannel(link, "\n");
        // a stray reading lands between the drop and the reply: the real reply comes where the sync answer should
        link.answer("1000,0.01,GOOD\n47000,0.01,GOOD\n1\n");
        MeterException e = assertThrows(MeterException.class, () -> ch.queryConfirmed("TRIG:RX?", "*OPC?", ONE, 20, 20));
        assertEquals(FaultKind.GARBLED, e.kind());
        // in step again once the owed sync answer and the settle's own have come
        link.answer("1\n");
        ch.settle("*OPC?", ONE, 20);
        link.answer("4700,0.01,GOOD\n1\n");
        assertEquals("4700,0.01,GOOD", ch.queryConfirmed("TRIG:RX?", "*OPC?", ONE, 20, 20));
    }

    @Test
    void aReplyWithoutTerminator_timesOutWithWhatCameBack() {
        Script link = new Script();
        LineChannel ch = new LineChannel(link, "\n");
        link.answer("half a rep");
        MeterException e = assertThrows(MeterException.class, () -> ch.query("TRIG:RX?", 20));
        assertEquals(FaultKind.TIMEOUT, e.kind());
        assertEquals("half a rep", e.received());
        assertEquals("TRIG:RX?", e.sent());
    }

    @Test
    void aSyncAnswerStillOwed_isCountedOff_notTakenForTheReplyNorForAStrayLine() throws Exception {
        Script link = new Script();
        LineChannel ch = new LineChannel(link, "\n");
        link.answer("4700,0.01,GOOD\n");
        // the reply came but its sync answer did not (the meter was slow): it is owed
        assertEquals(FaultKind.TIMEOUT, assertThrows(MeterException.class, () -> ch.queryConfirmed("TRIG:RX?", "*OPC?", ONE, 20, 20)).kind());
        link.answer("1\n1\n"); // the owed answer, then the settle's own
        ch.settle("*OPC?", ONE, 20);
        link.whole("1\n"); // one sync answer more than was owed: dropped before the next query
        link.answer("47000,0.01,GOOD\n1\n");
        assertEquals("47000,0.01,GOOD", ch.queryConfirmed("TRIG:RX?", "*OPC?", ONE, 20, 20));
    }

    private static final java.util.regex.Pattern ONE = java.util.regex.Pattern.compile("^1$");

    /** Lets {@code arriving} come in, settles, then checks the next reading is the one sent after it. */
    private static void settleThenRead(Script link, LineChannel ch, String arriving, String why) throws MeterException {
        link.answer(arriving);
        ch.settle("*OPC?", ONE, 20);
        link.answer("47000,0.01,0\n");
        assertEquals("47000,0.01,0", ch.query("TRIG:RX?", 20), why);
    }

    @Test
    void aSettleThatTimedOut_stillOwesItsAnswer_soNoSyncAnswerIsTakenForAReading() throws Exception {
        Script link = new Script();
        LineChannel ch = new LineChannel(link, "\n");
        assertEquals(FaultKind.TIMEOUT, assertThrows(MeterException.class, () -> ch.query("TRIG:RX?", 20)).kind());
        assertEquals(FaultKind.TIMEOUT, assertThrows(MeterException.class, () -> ch.settle("*OPC?", ONE, 20)).kind());
        // the late reading, then the answers to both sync queries, arrive together
        settleThenRead(link, ch, "1000,0.01,0\n1\n1\n", "the second sync answer is not taken for the reading");
    }

    @Test
    void aSetupConfirmationThatTimedOut_isOwedToo() throws Exception {
        Script link = new Script();
        LineChannel ch = new LineChannel(link, "\n");
        assertEquals(FaultKind.TIMEOUT, assertThrows(MeterException.class, () -> ch.syncQuery("*OPC?", 20)).kind());
        settleThenRead(link, ch, "1\n1\n", "the settle's own sync answer is not taken for the reading");
    }
}
