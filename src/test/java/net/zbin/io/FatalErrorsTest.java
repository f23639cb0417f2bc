package net.zbin.io;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.concurrent.CompletableFuture;
import java.util.concurrent.Executors;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Test;

/** A periodic task's Error reaches the uncaught-exception handler instead of stopping the task in silence. */
class FatalErrorsTest {
    @Test
    void anErrorInAScheduledTask_reachesTheHandler_aPlainOneWouldNot() throws Exception {
        var heard = new CompletableFuture<Throwable>();
        var timer = Executors.newSingleThreadScheduledExecutor(r -> {
            Thread t = new Thread(r, "fatal-errors-test");
            t.setDaemon(true);
            t.setUncaughtExceptionHandler((th, e) -> heard.complete(e));
            return t;
        });
        try {
            var plain = timer.schedule(() -> { throw new OutOfMemoryError("plain"); }, 0, TimeUnit.MILLISECONDS);
            assertTrue(assertThrowsCause(plain) instanceof OutOfMemoryError, "the executor keeps it in the future");
            assertTrue(!heard.isDone(), "unwrapped: the handler heard nothing");
            timer.schedule(FatalErrors.surfaced(() -> { throw new OutOfMemoryError("surfaced"); }), 0, TimeUnit.MILLISECONDS);
            assertEquals("surfaced", heard.get(10, TimeUnit.SECONDS).getMessage());
        } finally {
            timer.shutdownNow();
        }
    }

    static Throwable assertThrowsCause(java.util.concurrent.Future<?> f) throws Exception {
        try {
            f.get(10, TimeUnit.SECONDS);
            throw new AssertionError("no error");
        } catch (java.util.concurrent.ExecutionException e) {
            return e.getCause();
        }
    }
}
