package net.zbin.app.daemon;

import java.io.IOException;
import java.util.List;
import java.util.concurrent.TimeUnit;

/**
 * Runs a system tool on this process's own threads ({@code renice}, {@code taskset}: what Java cannot do itself), waiting
 * five seconds at most, its output discarded: the caller reads the result back from {@code /proc}.
 */
final class OwnTool {
    private OwnTool() {}

    /** Null when the tool ran (whatever it did), else why not: it is missing, or this thread was interrupted. */
    static String run(List<String> cmd) {
        try {
            Process p = new ProcessBuilder(cmd).redirectErrorStream(true).redirectOutput(ProcessBuilder.Redirect.DISCARD).start();
            if (!p.waitFor(5, TimeUnit.SECONDS)) p.destroyForcibly();
            return null;
        } catch (IOException e) {
            return e.getMessage();
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            return "interrupted";
        }
    }
}
