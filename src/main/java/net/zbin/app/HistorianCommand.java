package net.zbin.app;

import java.nio.file.Path;
import java.time.Clock;
import java.util.concurrent.Callable;
import java.util.concurrent.CountDownLatch;
import net.zbin.io.db.HistorianConfig;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;

/** {@code zbin historian}: every decision of the followed lines into PostgreSQL, until SIGTERM or Ctrl-C. */
@Command(name = "historian", mixinStandardHelpOptions = true,
        description = {"Follow lines' record folders and alarm histories and write every row into PostgreSQL, exactly once.",
                "Resumes from what the database committed; waits and retries while the database is away."})
public final class HistorianCommand implements Callable<Integer> {
    @Option(names = "--config", required = true, paramLabel = "FILE", description = "historian config")
    Path config;

    @picocli.CommandLine.Spec
    picocli.CommandLine.Model.CommandSpec spec;

    @Override
    public Integer call() throws Exception {
        RunCommand.haltOnFatalErrors();
        HistorianConfig cfg = HistorianConfig.load(config);
        Historian h = new Historian(cfg, Clock.systemUTC());
        HistorianMetrics metrics = cfg.metricsListen() == null ? null : HistorianMetrics.start(h, cfg.metricsListen());
        CountDownLatch done = new CountDownLatch(1);
        Thread main = Thread.currentThread();
        Runtime.getRuntime().addShutdownHook(new Thread(() -> {
            h.close();
            try {
                done.await(10, java.util.concurrent.TimeUnit.SECONDS);
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
            }
        }, "zbin-historian-stop"));
        spec.commandLine().getOut().println("zbin: historian following " + cfg.lines().size() + " line(s) into " + cfg.ingest().url()
                + (metrics == null ? "" : ", metrics at " + metrics.url()));
        spec.commandLine().getOut().flush();
        try {
            h.run();
        } finally {
            if (metrics != null) metrics.close();
            done.countDown();
        }
        return Main.EXIT_OK;
    }
}
