package net.zbin.io.meter;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import java.nio.charset.StandardCharsets;
import java.util.ArrayDeque;
import java.util.Deque;
import net.zbin.core.FaultKind;
import org.junit.jupiter.api.Test;

/** Framing alone, over a scripted link: how the bytes are cut into reads must not matter. */
class LineChannelTest {
    /** Hands out the scripted chunks one read at a time, then nothing. */
    static final class Script implements Transport {
        final Deque<byte[]> chunks = new ArrayDeque<>();
        public void open() { }
        public boolean isOpen() { return true; }
        public void write(byte[] d) { }
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
    }

    @Test
    void terminatorSplitAcrossReads_andTwoRepliesInOneRead_areFramedAlike() throws Exception {
        Script link = new Script();
        LineChannel ch = new LineChannel(link, "\r\n");
        link.bytewise("1.5,-2.5,GOOD\r\n");
        assertEquals("1.5,-2.5,GOOD", ch.query("Q", 100));
        link.whole("first\r\nsecond\r\nthi");
        link.bytewise("rd\r");
        link.bytewise("\n");
        assertEquals("first", ch.query("Q", 100));
        assertEquals("second", ch.query("Q", 100));
        assertEquals("third", ch.query("Q", 100));
    }

    @Test
    void aReplyWithoutTerminator_timesOutWithWhatCameBack() {
        Script link = new Script();
        LineChannel ch = new LineChannel(link, "\n");
        link.whole("half a rep");
        MeterException e = assertThrows(MeterException.class, () -> ch.query("TRIG:RX?", 20));
        assertEquals(FaultKind.TIMEOUT, e.kind());
        assertEquals("half a rep", e.received());
        assertEquals("TRIG:RX?", e.sent());
    }

    private static final java.util.regex.Pattern ONE = java.util.regex.Pattern.compile("^1$");

    /** Lets {@code arriving} come in, settles, then checks the next reading is the one sent after it. */
    private static void settleThenRead(Script link, LineChannel ch, String arriving, String why) throws MeterException {
        link.whole(arriving);
        ch.settle("*OPC?", ONE, 20);
        link.whole("47000,0.01,0\n");
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
