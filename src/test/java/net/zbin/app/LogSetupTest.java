package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;

import ch.qos.logback.classic.Level;
import ch.qos.logback.classic.Logger;
import ch.qos.logback.classic.LoggerContext;
import ch.qos.logback.classic.spi.Configurator;
import org.junit.jupiter.api.Test;

/** zbin's logging set up in code: the level from ZBIN_LOG_LEVEL, one appender on standard error, a file of one's own respected. */
class LogSetupTest {
    @Test
    void level_namesTheLevel_andFallsBackToWarn() {
        assertEquals(Level.DEBUG, LogSetup.level("debug"));
        assertEquals(Level.INFO, LogSetup.level(" INFO "));
        assertEquals(Level.WARN, LogSetup.level(null));
        assertEquals(Level.WARN, LogSetup.level("loud"));
    }

    @Test
    void configure_setsTheRootAtTheLevel_withStandardError_andQuietsTheBrokerLibraries() {
        var ctx = new LoggerContext();
        String before = System.getProperty("ZBIN_LOG_LEVEL");
        System.setProperty("ZBIN_LOG_LEVEL", "INFO");
        try {
            var setup = new LogSetup();
            setup.setContext(ctx);
            assertEquals(Configurator.ExecutionStatus.DO_NOT_INVOKE_NEXT_IF_ANY, setup.configure(ctx));
        } finally {
            if (before == null) System.clearProperty("ZBIN_LOG_LEVEL");
            else System.setProperty("ZBIN_LOG_LEVEL", before);
        }
        Logger root = ctx.getLogger(Logger.ROOT_LOGGER_NAME);
        assertEquals(Level.INFO, root.getLevel());
        var err = (ch.qos.logback.core.ConsoleAppender<?>) root.getAppender("ERR");
        assertNotNull(err);
        assertEquals("System.err", err.getTarget());
        assertEquals(Level.WARN, ctx.getLogger("org.eclipse.paho").getLevel());
        ctx.stop();
    }

    @Test
    void aConfigurationFileOfOnesOwn_isLeftToLogback() {
        var ctx = new LoggerContext();
        System.setProperty("logback.configurationFile", "elsewhere.xml");
        try {
            var setup = new LogSetup();
            setup.setContext(ctx);
            assertEquals(Configurator.ExecutionStatus.INVOKE_NEXT_IF_ANY, setup.configure(ctx));
            assertEquals(null, ctx.getLogger(Logger.ROOT_LOGGER_NAME).getAppender("ERR"));
        } finally {
            System.clearProperty("logback.configurationFile");
        }
    }
}
