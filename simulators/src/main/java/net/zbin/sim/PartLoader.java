package net.zbin.sim;

import java.io.IOException;
import java.io.OutputStream;
import java.net.InetSocketAddress;
import java.net.Socket;
import java.nio.charset.StandardCharsets;

/** How the handler simulator puts a part on the meter's contacts. */
public interface PartLoader extends AutoCloseable {
    void present(LotGenerator.SimPart part) throws IOException;

    void presentOpen() throws IOException;

    void presentShort() throws IOException;

    void presentReference(PartModel reference) throws IOException;

    @Override
    default void close() { }

    /** The meter simulator runs in this process: load its contacts directly. */
    static PartLoader direct(Contacts c) {
        return new PartLoader() {
            public void present(LotGenerator.SimPart p) { LotGenerator.present(p, c); }
            public void presentOpen() { c.open(); }
            public void presentShort() { c.shortBar(); }
            public void presentReference(PartModel m) { c.load(m, 0); }
        };
    }

    /** The meter simulator runs elsewhere: send it SIM: commands over its own TCP port. */
    static PartLoader remote(String host, int port) throws IOException {
        Socket s = new Socket();
        s.setTcpNoDelay(true);
        s.connect(new InetSocketAddress(host, port), 2000);
        s.setSoTimeout(5000);
        OutputStream out = s.getOutputStream();
        java.io.BufferedReader in = new java.io.BufferedReader(new java.io.InputStreamReader(s.getInputStream(), StandardCharsets.US_ASCII));
        return new PartLoader() {
            /**
             * Sends a SIM: command and waits until the simulator has carried it out (its answer to *OPC? behind it,
             * on the same connection), as a handler places the part before it triggers: otherwise the line could
             * measure what was on the contacts before.
             */
            private void send(String line) throws IOException {
                out.write((line + "\n*OPC?\n").getBytes(StandardCharsets.US_ASCII));
                out.flush();
                String done = in.readLine();
                if (!"1".equals(done)) throw new IOException("meter simulator did not confirm '" + line + "' (answered " + done + ")");
            }

            public void present(LotGenerator.SimPart p) throws IOException {
                switch (p.state()) {
                    case OPEN -> send("SIM:OPEN");
                    case SHORT -> send("SIM:SHORT");
                    case PART -> presentReference(p.model());
                }
            }

            public void presentOpen() throws IOException { send("SIM:OPEN"); }

            public void presentShort() throws IOException { send("SIM:SHORT"); }

            public void presentReference(PartModel m) throws IOException { send(m.loadCommand()); }

            public void close() {
                try {
                    s.close();
                } catch (IOException ignored) {
                    // closing
                }
            }
        };
    }
}
