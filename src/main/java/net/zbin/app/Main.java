package net.zbin.app;

import java.io.PrintWriter;
import net.zbin.io.ConfigException;
import picocli.CommandLine;
import picocli.CommandLine.Command;

/** The {@code zbin} command line. Exit codes: 0 ok, 1 runtime failure, 2 bad usage, config or input. */
@Command(name = "zbin", mixinStandardHelpOptions = true, versionProvider = Main.Version.class,
        description = "Sorting controller for passive-component lines: measures each part through an impedance meter,"
                + " grades it by recipe and tells the handler which bin it goes in.",
        subcommands = {DemoCommand.class, RunCommand.class, PanelCommand.class, HistorianCommand.class, ReportCommand.class, CalcCommand.class, CheckCommand.class, ReplayCommand.class, TuneCommand.class, CompensateCommand.class, SimCommand.class,
                CommandLine.HelpCommand.class})
public final class Main implements Runnable {
    public static final int EXIT_OK = 0;
    public static final int EXIT_RUNTIME = 1;
    public static final int EXIT_USAGE = 2;

    @CommandLine.Spec
    CommandLine.Model.CommandSpec spec;

    @Override
    public void run() {
        throw new CommandLine.ParameterException(spec.commandLine(), "name a command (see zbin --help)");
    }

    public static void main(String[] args) {
        System.exit(execute(args, new PrintWriter(System.out, true), new PrintWriter(System.err, true)));
    }

    /** Runs one command line; used by tests too, so nothing here may call System.exit. */
    public static int execute(String[] args, PrintWriter out, PrintWriter err) {
        CommandLine cl = args.length > 0 && args[0].equals("run") ? daemonOnly() : new CommandLine(new Main());
        cl.setOut(out);
        cl.setErr(err);
        cl.setUsageHelpWidth(100);
        cl.setExecutionExceptionHandler((ex, line, parse) -> {
            if (ex instanceof ConfigException || ex instanceof UsageException) {
                err.println("zbin: " + ex.getMessage());
                return EXIT_USAGE;
            }
            // A file or folder named on the command line that is missing or closed to us is bad input, not a crash.
            if (ex instanceof java.nio.file.NoSuchFileException nf) {
                err.println("zbin: no such file or folder: " + nf.getFile());
                return EXIT_USAGE;
            }
            if (ex instanceof java.nio.file.AccessDeniedException ad) {
                err.println("zbin: permission denied: " + ad.getFile());
                return EXIT_USAGE;
            }
            err.println("zbin: " + ex);
            if (System.getenv("ZBIN_DEBUG") != null) ex.printStackTrace(err);
            return EXIT_RUNTIME;
        });
        int rc = cl.execute(args);
        out.flush();
        err.flush();
        return rc;
    }

    /**
     * {@code zbin} with only its {@code run} command: what a line's service starts. Picocli reads the annotations of
     * every command it is given, and the whole tree (a dozen commands and their options) took some 0.3 s of every
     * daemon start; {@code zbin run}'s options, help, errors and exit codes are the same either way.
     */
    static CommandLine daemonOnly() {
        var top = CommandLine.Model.CommandSpec.wrapWithoutInspection(new Main()).name("zbin").mixinStandardHelpOptions(true);
        top.versionProvider(new Version());
        top.addSubcommand("run", new CommandLine(new RunCommand()));
        return new CommandLine(top);
    }

    /** Version from the jar manifest, or "dev" when run from classes. */
    static final class Version implements CommandLine.IVersionProvider {
        @Override
        public String[] getVersion() {
            String v = Main.class.getPackage().getImplementationVersion();
            return new String[] {"zbin " + (v == null ? "dev" : v)};
        }
    }
}
