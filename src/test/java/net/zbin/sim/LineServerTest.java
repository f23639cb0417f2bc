package net.zbin.sim;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.charset.StandardCharsets;
import java.time.Clock;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;

/** How the simulated meter's line server answers what arrives: in order, and the answers to one read in one write. */
class LineServerTest {
    /** Every write the server makes, as text. */
    static final class Writes implements LineServer.Sink {
        final List<String> writes = new ArrayList<>();
        boolean disconnected;

        @Override
        public synchronized void write(byte[] b) { writes.add(new String(b, StandardCharsets.ISO_8859_1)); }

        @Override
        public void disconnect() { disconnected = true; }
    }

    private static SimMeter meter() {
        return new SimMeter(new Contacts(), Fixture.IDEAL, Clock.systemUTC(), 1, 0, SimMeter.RandomFaults.NONE);
    }

    private static void feed(LineServer s, String text, Writes w) throws Exception {
        byte[] b = text.getBytes(StandardCharsets.ISO_8859_1);
        s.feed(b, b.length, w);
    }

    @Test
    void theRepliesToOneFeed_goOutInOneWrite_inOrder() throws Exception {
        Writes w = new Writes();
        LineServer s = new LineServer(meter());
        feed(s, "CONF:FREQ 1000\nCONF:FREQ?\n*OPC?\n", w);
        assertEquals(1, w.writes.size(), w.writes.toString());
        String[] lines = w.writes.get(0).split("\n", -1);
        assertEquals(3, lines.length, w.writes.toString()); // two answers and the empty rest after the last terminator
        assertEquals(1000, Double.parseDouble(lines[0]), 0);
        assertEquals("1", lines[1]);
    }

    @Test
    void aLineCutAcrossFeeds_isAnsweredWhenItsTerminatorArrives() throws Exception {
        Writes w = new Writes();
        LineServer s = new LineServer(meter());
        feed(s, "*OP", w);
        assertEquals(List.of(), w.writes);
        feed(s, "C?\r\n*OPC?\n", w);
        assertEquals(List.of("1\n1\n"), w.writes);
    }

    @Test
    void aDisconnect_sendsWhatWasAnsweredBeforeIt_andNothingAfter() throws Exception {
        Writes w = new Writes();
        SimMeter m = meter();
        LineServer s = new LineServer(m);
        feed(s, "SIM:FAULT DISCONNECT\n*OPC?\nTRIG:RX?\n*OPC?\n", w);
        assertEquals(List.of("1\n"), w.writes);
        assertTrue(w.disconnected);
    }
}
