package net.zbin.app;

import ch.qos.logback.classic.Level;
import ch.qos.logback.classic.Logger;
import ch.qos.logback.classic.LoggerContext;
import ch.qos.logback.classic.encoder.PatternLayoutEncoder;
import ch.qos.logback.classic.spi.Configurator;
import ch.qos.logback.classic.spi.ILoggingEvent;
import ch.qos.logback.core.ConsoleAppender;
import ch.qos.logback.core.spi.ContextAwareBase;

/**
 * zbin's logging, set up in code: one line per event on standard error (the service manager's journal keeps it), at
 * {@code ZBIN_LOG_LEVEL} (environment or system property; WARN when unset), the broker libraries' chatter at WARN.
 * Reading an XML configuration took a fifth of a second of every start; a file of one's own still works: with
 * {@code -Dlogback.configurationFile=FILE} this steps aside for it.
 */
public final class LogSetup extends ContextAwareBase implements Configurator {
    static final String PATTERN = "%d{HH:mm:ss.SSS} %-5level [%thread] %logger{20} - %msg%n";

    @Override
    public ExecutionStatus configure(LoggerContext ctx) {
        if (System.getProperty("logback.configurationFile") != null) return ExecutionStatus.INVOKE_NEXT_IF_ANY;
        var encoder = new PatternLayoutEncoder();
        encoder.setContext(ctx);
        encoder.setPattern(PATTERN);
        encoder.start();
        var err = new ConsoleAppender<ILoggingEvent>();
        err.setContext(ctx);
        err.setName("ERR");
        err.setTarget("System.err");
        err.setEncoder(encoder);
        err.start();
        Logger root = ctx.getLogger(Logger.ROOT_LOGGER_NAME);
        root.setLevel(level(System.getProperty("ZBIN_LOG_LEVEL", System.getenv("ZBIN_LOG_LEVEL"))));
        root.addAppender(err);
        for (String chatty : new String[] {"io.moquette", "io.netty", "org.eclipse.paho"}) ctx.getLogger(chatty).setLevel(Level.WARN);
        return ExecutionStatus.DO_NOT_INVOKE_NEXT_IF_ANY;
    }

    /** The level a value names (TRACE, DEBUG, INFO, WARN, ERROR, OFF; any case), WARN for none or another word. */
    static Level level(String v) { return Level.toLevel(v == null ? null : v.trim(), Level.WARN); }
}
