package net.zbin.io.meter;

import java.io.IOException;

/**
 * A byte link to the meter (serial port or TCP socket). Framing lives above it in {@link LineChannel}.
 * Implementations are single-threaded: one meter session owns one transport.
 */
public interface Transport extends AutoCloseable {
    /** Opens (or reopens) the link. */
    void open() throws IOException;

    boolean isOpen();

    void write(byte[] data) throws IOException;

    /**
     * Reads what is available within the timeout.
     *
     * @return bytes read, 0 when the timeout passed with nothing, −1 when the peer closed the link
     */
    int read(byte[] buf, int timeoutMs) throws IOException;

    /**
     * Bytes received and waiting to be read now, without waiting for more. Used to drop what the meter sent
     * unasked before a query and to notice data that follows a reply.
     */
    int available() throws IOException;

    /** A short description for logs and messages ("tcp 127.0.0.1:5025", "serial /dev/ttyUSB0"). */
    String describe();

    @Override
    void close();
}
