package net.zbin.sim;

import java.io.ByteArrayOutputStream;
import java.nio.charset.StandardCharsets;

/** Splits incoming bytes into lines for the simulated meter and renders its replies. */
final class LineServer {
    private final SimMeter meter;
    private final ByteArrayOutputStream line = new ByteArrayOutputStream();

    LineServer(SimMeter meter) { this.meter = meter; }

    interface Sink {
        void write(byte[] b) throws java.io.IOException;

        void disconnect() throws java.io.IOException;
    }

    /** Writes whole lines in one write; a late reply writes from another thread, so lines never interleave. */
    private synchronized void send(Sink out, byte[] bytes) throws java.io.IOException {
        out.write(bytes);
    }

    private void later(Sink out, Reply.Later l) {
        Thread t = new Thread(() -> {
            try {
                Thread.sleep(l.delayMs());
                send(out, (l.line() + "\n").getBytes(StandardCharsets.ISO_8859_1));
            } catch (InterruptedException | java.io.IOException e) {
                // the link is gone: the late line has nowhere to go
            }
        }, "sim-meter-late");
        t.setDaemon(true);
        t.start();
    }

    /**
     * Feeds bytes; each complete line is handled in turn. The replies to the lines of one feed go out in one write
     * after the last of them, as an instrument sends its output queue for a program message of several queries
     * (a measure query with {@code *OPC?} behind it comes back as one piece).
     */
    void feed(byte[] buf, int n, Sink out) throws java.io.IOException {
        ByteArrayOutputStream replies = new ByteArrayOutputStream();
        for (int i = 0; i < n; i++) {
            byte b = buf[i];
            if (b == '\n') {
                String cmd = line.toString(StandardCharsets.ISO_8859_1);
                line.reset();
                if (cmd.endsWith("\r")) cmd = cmd.substring(0, cmd.length() - 1);
                Reply r = meter.handle(cmd);
                if (r instanceof Reply.Text t) replies.write((t.line() + "\n").getBytes(StandardCharsets.ISO_8859_1));
                else if (r instanceof Reply.WithStray w)
                    replies.write((w.line() + "\n" + w.stray() + "\n").getBytes(StandardCharsets.ISO_8859_1));
                else if (r instanceof Reply.Later l) later(out, l);
                else if (r instanceof Reply.Garbage g) {
                    replies.write(g.bytes());
                    replies.write('\n');
                } else if (r instanceof Reply.Disconnect) {
                    if (replies.size() > 0) send(out, replies.toByteArray());
                    replies.reset();
                    out.disconnect();
                    return;
                }
            } else if (line.size() < 8192) line.write(b);
        }
        if (replies.size() > 0) send(out, replies.toByteArray());
    }
}
