package net.zbin.io.meter;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import net.zbin.core.FaultKind;

/**
 * Terminator-framed text over a {@link Transport}: send a line, read one reply line within a
 * deadline. After a failed exchange the link may still deliver a late reply; {@link #settle} must
 * run before the next exchange so that a reply is never matched to the wrong query. Whatever the meter
 * sent unasked is dropped before each query (and counted), and {@link #queryConfirmed} brackets a query
 * with the sync query so that a line arriving between the drop and the reply shows as a mismatch.
 */
final class LineChannel {
    private static final int MAX_LINE = 4096;

    private final Transport transport;
    private final byte[] terminator;
    private final byte[] buf = new byte[1024];
    private final Pending pending = new Pending();
    private final String terminatorText;
    private boolean dirty;
    /** Bytes the meter sent that answered no query of ours (dropped before a query), for the log and the figures. */
    private long unaskedBytes;
    /**
     * Sync queries sent whose answers have not been read: a settle that timed out leaves its query in flight,
     * and its answer must not be taken for the next one's (nor, later, for a reading).
     */
    private int syncsOwed;
    /** Beyond this many unanswered sync queries the meter is taken to have dropped them; only the newest is awaited. */
    private static final int MAX_SYNCS_OWED = 3;

    LineChannel(Transport transport, String terminator) {
        this.transport = transport;
        this.terminator = terminator.getBytes(StandardCharsets.US_ASCII);
        this.terminatorText = terminator;
    }

    Transport transport() { return transport; }

    /** True after a failed exchange, until {@link #settle} succeeds. */
    boolean dirty() { return dirty; }

    /**
     * Brings the link back in step after a failure. With a sync query (e.g. {@code *OPC?}) it is sent
     * and every line before its answer is discarded: a meter answers in order, so a late reply can
     * only come before it. An earlier settle that timed out still owes its answer, so every sync query sent
     * is answered before the link counts as in step. Without one, whatever arrives within 20 ms is discarded.
     */
    void settle(String syncQuery, java.util.regex.Pattern syncExpect, int timeoutMs) throws MeterException {
        if (!dirty) return;
        syncPattern = syncExpect;
        if (syncQuery == null) {
            drain(null);
            return;
        }
        // what is framed already stays: the owed sync answers may be among it
        if (syncsOwed >= MAX_SYNCS_OWED) syncsOwed = 0;
        write(syncQuery);
        syncsOwed++;
        long deadline = System.nanoTime() + timeoutMs * 1_000_000L;
        boolean answered = false;
        while (true) {
            long left = (deadline - System.nanoTime()) / 1_000_000L;
            String line;
            try {
                if (left <= 0) throw new MeterException(FaultKind.TIMEOUT, syncQuery, null, "meter did not come back in step within " + timeoutMs + " ms");
                line = readLine(syncQuery, (int) left);
            } catch (MeterException e) {
                // The meter answers sync queries, just fewer than were counted as owed (a swallowed query's bracket was
                // answered and taken for something else): count none owed, and the next settle's own answer ends it.
                if (answered && e.kind() == FaultKind.TIMEOUT) syncsOwed = 0;
                throw e;
            }
            if (syncExpect.matcher(line).find()) {
                answered = true;
                if (--syncsOwed == 0) {
                    dirty = false;
                    return;
                }
            }
        }
    }

    /**
     * Sends the sync query as a plain exchange (after setup commands). Should it time out, its answer is still
     * owed, and the next {@link #settle} waits for it too.
     */
    String syncQuery(String syncQuery, int timeoutMs) throws MeterException {
        if (dirty) throw new IllegalStateException("settle the link before the next exchange");
        dropUnasked(syncQuery);
        send(syncQuery);
        syncsOwed++;
        String line = readLine(syncQuery, timeoutMs);
        syncsOwed--;
        return line;
    }

    /** Sends a command that has no reply. */
    void send(String command) throws MeterException {
        if (dirty) throw new IllegalStateException("settle the link before the next exchange");
        write(command);
    }

    private void write(String command) throws MeterException {
        try {
            transport.write((command + terminatorText).getBytes(StandardCharsets.US_ASCII));
        } catch (IOException e) {
            transport.close();
            throw new MeterException(FaultKind.DISCONNECTED, command, null, "write failed on " + transport.describe() + ": " + e.getMessage(), e);
        }
    }

    /** Drops what waits unasked, sends a query and returns its reply line without the terminator. */
    String query(String command, int timeoutMs) throws MeterException {
        if (dirty) throw new IllegalStateException("settle the link before the next exchange");
        dropUnasked(command);
        send(command);
        return readLine(command, timeoutMs);
    }

    /**
     * A query proven to be answered by its own reply: what waits unasked is dropped, the query and the sync query
     * go out together, and the reply counts only when the very next line is the sync answer and nothing follows it.
     * A meter answers in order, so a stray line (a late reply, a front-panel line) anywhere in the exchange makes
     * the line after the reply something other than the sync answer: a GARBLED failure, and the link is resynced
     * before the next exchange. Never is the stray line, or the reply behind it, returned as this query's answer.
     *
     * @param timeoutMs     for the reply
     * @param syncTimeoutMs for the sync answer after it
     */
    String queryConfirmed(String command, String syncQuery, java.util.regex.Pattern syncExpect, int timeoutMs, int syncTimeoutMs)
            throws MeterException {
        if (dirty) throw new IllegalStateException("settle the link before the next exchange");
        syncPattern = syncExpect;
        dropUnasked(command);
        int stale = syncsOwed; // sync answers still owed from before: in order, they come before this query's reply
        write(command + terminatorText + syncQuery);
        syncsOwed++;
        long deadline = System.nanoTime() + timeoutMs * 1_000_000L;
        String reply = readLine(command, timeoutMs);
        while (stale > 0 && syncExpect.matcher(reply).find()) {
            stale--;
            syncsOwed--;
            reply = readLine(command, (int) Math.max(1, (deadline - System.nanoTime()) / 1_000_000L));
        }
        if (syncExpect.matcher(reply).find()) {
            syncsOwed--; // the sync answer came first: the meter answered the query behind the measure query, not it
            dirty = true;
            throw new MeterException(FaultKind.TIMEOUT, command, reply, "the meter answered " + syncQuery + " but not the query before it");
        }
        String confirm = readLine(syncQuery, syncTimeoutMs);
        if (!syncExpect.matcher(confirm).find()) {
            dirty = true; // the sync answer is still owed: the next settle waits for it too
            throw new MeterException(FaultKind.GARBLED, command, reply + terminatorText + confirm,
                    "the reply was not followed by the answer to " + syncQuery + ": a line that answers no query of ours is on the link");
        }
        syncsOwed--;
        failIfMoreFollows(command, reply);
        return reply;
    }

    /** After a reply: bytes already waiting behind it answer no query of ours, so the reply is not proven either. */
    void failIfMoreFollows(String sent, String reply) throws MeterException {
        int more = waiting(sent);
        if (more == 0) return;
        dirty = true;
        throw new MeterException(FaultKind.GARBLED, sent, reply + terminatorText + pending.text(),
                "more data followed the reply (" + more + " bytes): the meter sent something no query asked for");
    }

    /** Bytes received and not taken: what is framed already plus what the transport holds. */
    private int waiting(String sent) throws MeterException {
        try {
            return pending.size() + transport.available();
        } catch (IOException e) {
            transport.close();
            throw new MeterException(FaultKind.DISCONNECTED, sent, null, "read failed on " + transport.describe() + ": " + e.getMessage(), e);
        }
    }

    /** Drops what the meter sent unasked before a query, without waiting for more; owed sync answers among it are counted off. */
    private void dropUnasked(String sent) throws MeterException {
        long dropped = countOffSyncAnswers();
        try {
            while (transport.available() > 0) {
                int n = transport.read(buf, 1);
                if (n < 0) {
                    transport.close();
                    throw new MeterException(FaultKind.DISCONNECTED, sent, null, "the meter closed the link (" + transport.describe() + ")");
                }
                if (n == 0) break;
                pending.append(buf, n);
                dropped += countOffSyncAnswers();
            }
        } catch (IOException e) {
            transport.close();
            throw new MeterException(FaultKind.DISCONNECTED, sent, null, "read failed on " + transport.describe() + ": " + e.getMessage(), e);
        }
        dropped += pending.size();
        pending.reset();
        unaskedBytes += dropped;
    }

    /** The sync answer's pattern, once a confirmed query or a settle told it. */
    private java.util.regex.Pattern syncPattern;

    /**
     * Takes the whole lines waiting: each that is a sync answer still owed is counted off (it answered a query of
     * ours); returns the bytes of the others, which answered none.
     */
    private long countOffSyncAnswers() {
        long stray = 0;
        String line;
        while ((line = pending.takeLine(terminator)) != null) {
            if (syncsOwed > 0 && syncPattern != null && syncPattern.matcher(line).find()) syncsOwed--;
            else stray += line.length() + terminator.length;
        }
        return stray;
    }

    /** Bytes dropped so far because they answered no query of ours. */
    long unaskedBytes() { return unaskedBytes; }

    private String readLine(String sent, int timeoutMs) throws MeterException {
        long deadline = System.nanoTime() + timeoutMs * 1_000_000L;
        while (true) {
            String line = pending.takeLine(terminator);
            if (line != null) return line;
            if (pending.size() > MAX_LINE) {
                String got = pending.text();
                pending.reset();
                dirty = true;
                throw new MeterException(FaultKind.GARBLED, sent, got, "reply longer than " + MAX_LINE + " bytes without terminator");
            }
            long left = (deadline - System.nanoTime()) / 1_000_000L;
            if (left <= 0) {
                String got = pending.size() == 0 ? null : pending.text();
                pending.reset();
                dirty = true;
                throw new MeterException(FaultKind.TIMEOUT, sent, got, "no reply within " + timeoutMs + " ms on " + transport.describe());
            }
            int n;
            try {
                n = transport.read(buf, (int) Math.min(left, Integer.MAX_VALUE));
            } catch (IOException e) {
                transport.close();
                throw new MeterException(FaultKind.DISCONNECTED, sent, pending.text(),
                        "read failed on " + transport.describe() + ": " + e.getMessage(), e);
            }
            if (n < 0) {
                String got = pending.size() == 0 ? null : pending.text();
                pending.reset();
                transport.close();
                throw new MeterException(FaultKind.DISCONNECTED, sent, got, "the meter closed the link (" + transport.describe() + ")");
            }
            pending.append(buf, n);
        }
    }

    /**
     * Bytes received but not yet taken as a line. Scans only what arrived since the last look, and
     * copies nothing until a whole line is there.
     */
    private static final class Pending {
        private byte[] data = new byte[256];
        private int len;
        private int scanned;

        int size() { return len; }

        void reset() {
            len = 0;
            scanned = 0;
        }

        void append(byte[] b, int n) {
            if (len + n > data.length) data = java.util.Arrays.copyOf(data, Math.max(data.length * 2, len + n));
            System.arraycopy(b, 0, data, len, n);
            len += n;
        }

        String text() { return new String(data, 0, len, StandardCharsets.ISO_8859_1); }

        /** The first complete line without its terminator, or null. */
        String takeLine(byte[] term) {
            outer:
            for (int i = Math.max(0, scanned - term.length + 1); i <= len - term.length; i++) {
                for (int k = 0; k < term.length; k++) if (data[i + k] != term[k]) continue outer;
                String line = new String(data, 0, i, StandardCharsets.ISO_8859_1);
                int rest = len - i - term.length;
                System.arraycopy(data, i + term.length, data, 0, rest);
                len = rest;
                scanned = 0;
                return line;
            }
            scanned = len;
            return null;
        }
    }

    /** Discards a late reply or garbage left by a failed exchange. */
    private void drain(String sent) throws MeterException {
        pending.reset();
        try {
            long end = System.nanoTime() + 20_000_000L;
            while (System.nanoTime() < end) {
                int n = transport.read(buf, 2);
                if (n < 0) {
                    transport.close();
                    throw new MeterException(FaultKind.DISCONNECTED, sent, null, "the meter closed the link (" + transport.describe() + ")");
                }
                if (n == 0) break;
            }
        } catch (IOException e) {
            transport.close();
            throw new MeterException(FaultKind.DISCONNECTED, sent, null, "read failed on " + transport.describe() + ": " + e.getMessage(), e);
        }
        dirty = false;
    }

    /** A reply was framed but made no sense: the link may be out of step. */
    void markDirty() { dirty = true; }

    void reset() {
        pending.reset();
        dirty = false;
        syncsOwed = 0;
    }
}
