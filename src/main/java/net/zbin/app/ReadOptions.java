package net.zbin.app;

import java.io.IOException;
import java.io.PrintWriter;
import java.nio.file.Files;
import java.nio.file.Path;
import picocli.CommandLine.Option;

/** What {@code replay} and {@code tune} share about reading a lot: the HTML report and the progress line. */
final class ReadOptions {
    @Option(names = "--report", paramLabel = "FILE.html", description = "also write a self-contained HTML report with plots")
    Path report;
    @Option(names = "--quiet", description = "no progress on stderr")
    boolean quiet;
    @Option(names = "--progress", description = "progress on stderr even when it is not a terminal")
    boolean progress;

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
