package net.zbin.io;

/**
 * A periodic task's fatal error made visible. A scheduled executor keeps what its task throws in the task's future: an
 * {@link Error} (out of memory, a linkage failure) would stop the task silently — no more dashboards, record-log
 * flushes or reconnects — while the process lived on. Wrapped here, an Error also goes to the thread's uncaught-exception
 * handler (which ends {@code zbin run} at once, see the README's Restarts), then on as before.
 */
public final class FatalErrors {
    private FatalErrors() {}

    /** The task, with any {@link Error} it throws also handed to the uncaught-exception handler. */
    public static Runnable surfaced(Runnable task) {
        return () -> {
            try {
                task.run();
            } catch (Error e) {
                Thread t = Thread.currentThread();
                Thread.UncaughtExceptionHandler h = t.getUncaughtExceptionHandler();
                if (h != null) h.uncaughtException(t, e);
                throw e;
            }
        };
    }
}
