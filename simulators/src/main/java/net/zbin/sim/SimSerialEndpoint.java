package net.zbin.sim;

import com.fazecast.jSerialComm.SerialPort;
import java.io.IOException;

/**
 * Serves the simulated meter on a serial device (one end of a socat pty pair). A serial line has
 * no connection to drop, so an injected disconnect shows as 300 ms of deafness, as when a meter
 * is power-cycled.
 */
public final class SimSerialEndpoint implements AutoCloseable {
    private final SerialPort port;
    private final Thread loop;
    private volatile boolean running = true;

    public SimSerialEndpoint(SimMeter meter, String path, int baud) throws IOException {
        if (System.getProperty("fazecast.jSerialComm.appid") == null) System.setProperty("fazecast.jSerialComm.appid", "zbin-sim");
        port = SerialPort.getCommPort(path);
        port.setComPortParameters(baud, 8, SerialPort.ONE_STOP_BIT, SerialPort.NO_PARITY);
        port.setFlowControl(SerialPort.FLOW_CONTROL_DISABLED);
        if (!port.openPort())
            throw new IOException("cannot open serial device " + path + " (error code " + port.getLastErrorCode() + ")");
        port.setComPortTimeouts(SerialPort.TIMEOUT_READ_SEMI_BLOCKING, 100, 0);
        LineServer lines = new LineServer(meter);
        loop = new Thread(() -> {
            byte[] buf = new byte[1024];
            LineServer.Sink sink = new LineServer.Sink() {
                public void write(byte[] b) { port.writeBytes(b, b.length); }

                public void disconnect() {
                    try {
                        Thread.sleep(300);
                    } catch (InterruptedException e) {
                        Thread.currentThread().interrupt();
                    }
                    port.flushIOBuffers();
                }
            };
            while (running) {
                int n = port.readBytes(buf, buf.length);
                if (n > 0) {
                    try {
                        lines.feed(buf, n, sink);
                    } catch (IOException e) {
                        return;
                    }
                } else if (n < 0 && running) {
                    try {
                        Thread.sleep(20);
                    } catch (InterruptedException e) {
                        return;
                    }
                }
            }
        }, "sim-meter-serial");
        loop.setDaemon(true);
        loop.start();
    }

    @Override
    public void close() {
        running = false;
        try {
            loop.join(1000);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
        port.closePort();
    }
}
