package net.zbin.app;

import java.io.IOException;
import java.io.PrintWriter;
import java.nio.file.Files;
import java.nio.file.Path;
import picocli.CommandLine.Option;

/**
 * What {@code replay} and {@code tune} share about reading a lot: the line whose engine decides it, the HTML report
 * and the progress line.
 */
final class ReadOptions {
    @Option(names = "--line-config", paramLabel = "LINE.yaml",
            description = "decide as this line does: its fixture-check limits and monitor settings (default: the recipe's own, default check limits)")
    Path lineConfig;
    @Option(names = "--report", paramLabel = "FILE.html", description = "also write a self-contained HTML report with plots")
    Path report;
    @Option(names = "--quiet", description = "no progress on stderr")
    boolean quiet;
    @Option(names = "--progress", description = "progress on stderr even when it is not a terminal")
    boolean progress;

    private net.zbin.io.LineConfig line;

    /** The line config of {@code --line-config}, loaded once (null without it). */
    private net.zbin.io.LineConfig line() throws net.zbin.io.ConfigException {
        if (line == null && lineConfig != null) line = net.zbin.io.LineConfigLoader.load(lineConfig);
        return line;
    }

    /** The recipe as the line uses it: on the line's fixture (its open/short bounds) when {@code --line-config} is given. */
    net.zbin.core.Recipe forLine(net.zbin.core.Recipe recipe) throws net.zbin.io.ConfigException {
        return line() == null ? recipe : recipe.withFixture(line().bounds());
    }

    /** The engine the lot is decided by: the line's when {@code --line-config} is given, else the recipe's own. */
    net.zbin.core.LineEngine engine(net.zbin.core.Recipe recipe) throws net.zbin.io.ConfigException {
        return line() == null ? net.zbin.core.LineEngine.of(recipe) : line().engine(recipe);
    }

    /** Refuses an output file whose folder does not exist, naming the option. */
    static void folderOf(String option, Path file) throws UsageException {
        if (file == null) return;
        Path folder = file.toAbsolutePath().getParent();
        if (folder != null && !Files.isDirectory(folder)) throw new UsageException(option + ": folder " + folder + " does not exist");
    }

    /** The progress line for reading {@code in}, or null when the file is not there (the reader then says so). */
    RowProgress progress(PrintWriter err, Path in) throws IOException {
        return Files.exists(in) ? new RowProgress(err, in, quiet, progress) : null;
    }
}
