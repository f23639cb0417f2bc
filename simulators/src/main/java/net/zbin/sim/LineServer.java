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

    /** Writes one line; a late reply may write from another thread, so lines never interleave. */
    private synchronized void send(Sink out, String text) throws java.io.IOException {
        out.write((text + "\n").getBytes(StandardCharsets.ISO_8859_1));
    }

    private void later(Sink out, Reply.Later l) {
        Thread t = new Thread(() -> {
            try {
                Thread.sleep(l.delayMs());
                send(out, l.line());
            } catch (InterruptedException | java.io.IOException e) {
                // the link is gone: the late line has nowhere to go
            }
        }, "sim-meter-late");
        t.setDaemon(true);
        t.start();
    }

    /** Feeds bytes; each complete line is handled and its reply written to the sink. */
    void feed(byte[] buf, int n, Sink out) throws java.io.IOException {
        for (int i = 0; i < n; i++) {
            byte b = buf[i];
            if (b == '\n') {
                String cmd = line.toString(StandardCharsets.ISO_8859_1);
                line.reset();
                if (cmd.endsWith("\r")) cmd = cmd.substring(0, cmd.length() - 1);
                Reply r = meter.handle(cmd);
                if (r instanceof Reply.Text t) send(out, t.line());
                else if (r instanceof Reply.WithStray w) send(out, w.line() + "\n" + w.stray());
                else if (r instanceof Reply.Later l) later(out, l);
                else if (r instanceof Reply.Garbage g) {
                    synchronized (this) {
                        out.write(g.bytes());
                        out.write(new byte[] {'\n'});
                    }
                } else if (r instanceof Reply.Disconnect) {
                    out.disconnect();
                    return;
                }
            } else if (line.size() < 8192) line.write(b);
        }
    }
}
