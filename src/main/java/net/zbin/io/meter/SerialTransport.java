package net.zbin.io.meter;

import com.fazecast.jSerialComm.SerialPort;
import java.io.IOException;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/** A serial port through jSerialComm, semi-blocking reads with our own framing above. */
public final class SerialTransport implements Transport {
    private static final Logger LOG = LoggerFactory.getLogger(SerialTransport.class);

    static {
        if (System.getProperty("fazecast.jSerialComm.appid") == null) System.setProperty("fazecast.jSerialComm.appid", "zbin");
    }

    private final SerialSettings settings;
    private SerialPort port;
    private int timeoutSet = -1;

    public SerialTransport(SerialSettings settings) { this.settings = settings; }

    @Override
    public void open() throws IOException {
        close();
        SerialPort p = SerialPort.getCommPort(settings.port());
        p.setComPortParameters(settings.baud(), settings.dataBits(), stopBits(settings.stopBits()), parity(settings.parity()));
        p.setFlowControl(switch (settings.flow()) {
            case "rtscts" -> SerialPort.FLOW_CONTROL_RTS_ENABLED | SerialPort.FLOW_CONTROL_CTS_ENABLED;
            case "xonxoff" -> SerialPort.FLOW_CONTROL_XONXOFF_IN_ENABLED | SerialPort.FLOW_CONTROL_XONXOFF_OUT_ENABLED;
            default -> SerialPort.FLOW_CONTROL_DISABLED;
        });
        if (!p.openPort()) {
            int code = p.getLastErrorCode();
            LOG.warn("cannot open serial port {}: error code {} at source line {}", settings.port(), code, p.getLastErrorLocation());
            throw new IOException("cannot open serial port " + settings.port() + " (error code " + code + ")");
        }
        port = p;
        timeoutSet = -1;
    }

    private static int stopBits(double s) {
        return s == 1 ? SerialPort.ONE_STOP_BIT : s == 2 ? SerialPort.TWO_STOP_BITS : SerialPort.ONE_POINT_FIVE_STOP_BITS;
    }

    private static int parity(String p) {
        return switch (p) {
            case "even" -> SerialPort.EVEN_PARITY;
            case "odd" -> SerialPort.ODD_PARITY;
            case "mark" -> SerialPort.MARK_PARITY;
            case "space" -> SerialPort.SPACE_PARITY;
            default -> SerialPort.NO_PARITY;
        };
    }

    @Override
    public boolean isOpen() { return port != null && port.isOpen(); }

    @Override
    public void write(byte[] data) throws IOException {
        if (!isOpen()) throw new IOException("serial port " + settings.port() + " is not open");
        int n = port.writeBytes(data, data.length);
        if (n != data.length) throw new IOException("serial write to " + settings.port() + " failed (" + n + " of " + data.length + " bytes)");
    }

    @Override
    public int read(byte[] buf, int timeoutMs) throws IOException {
        if (!isOpen()) throw new IOException("serial port " + settings.port() + " is not open");
        int t = Math.max(1, timeoutMs);
        if (t != timeoutSet) {
            port.setComPortTimeouts(SerialPort.TIMEOUT_READ_SEMI_BLOCKING, t, 0);
            timeoutSet = t;
        }
        int n = port.readBytes(buf, buf.length);
        if (n < 0) return -1;
        return n;
    }

    @Override
    public int available() throws IOException {
        if (!isOpen()) throw new IOException("serial port " + settings.port() + " is not open");
        int n = port.bytesAvailable();
        if (n < 0) throw new IOException("serial port " + settings.port() + ": cannot read what is waiting (error code " + port.getLastErrorCode() + ")");
        return n;
    }

    @Override
    public String describe() { return "serial " + settings.port() + " " + settings.baud() + " baud"; }

    @Override
    public void close() {
        if (port != null) port.closePort();
        port = null;
    }
}
