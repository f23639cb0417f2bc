package net.zbin.app;

import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.TimeUnit;

/**
 * The processes a test started (its {@code zbin run} daemons): none may outlive the test, also when it fails — a daemon
 * left running redials a broker that is gone, or the next test's, for the rest of the suite. Stop them in
 * {@code @AfterEach}.
 */
final class StartedProcesses {
    private final List<Process> started = new ArrayList<>();

    /** Remembers {@code p} and returns it. */
    synchronized Process add(Process p) {
        started.add(p);
        return p;
    }

    /** Kills (SIGKILL) every one still alive and waits for it, up to 10 s each. */
    synchronized void stopAll() throws InterruptedException {
        for (Process p : started) if (p.isAlive()) p.destroyForcibly().waitFor(10, TimeUnit.SECONDS);
        started.clear();
    }
}
