package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.io.PrintWriter;
import java.io.StringWriter;
import org.junit.jupiter.api.Test;
import picocli.CommandLine;

/** {@code zbin run} is built alone for a quick start; it must read and answer exactly as in the whole command tree. */
class DaemonCommandLineTest {
    @Test
    void runAlone_hasTheUsageOfRunInTheWholeTree() {
        CommandLine whole = new CommandLine(new Main()).setUsageHelpWidth(100);
        CommandLine alone = Main.daemonOnly().setUsageHelpWidth(100);
        assertEquals(whole.getSubcommands().get("run").getUsageMessage(), alone.getSubcommands().get("run").getUsageMessage());
        assertEquals(whole.getSubcommands().get("run").getCommandSpec().qualifiedName(), alone.getSubcommands().get("run").getCommandSpec().qualifiedName());
    }

    @Test
    void runAlone_answersBadUsageAsTheWholeTreeDoes() throws Exception {
        for (String[] args : new String[][] {{"run"}, {"run", "--bogus"}, {"run", "--config"}, {"run", "--config", "no-such-line.yaml"},
                {"run", "--connect-timeout", "soon", "--config", "x.yaml"}}) {
            StringWriter aloneErr = new StringWriter(), wholeErr = new StringWriter();
            int alone = Main.execute(args, new PrintWriter(new StringWriter()), new PrintWriter(aloneErr));
            CommandLine whole = new CommandLine(new Main());
            whole.setErr(new PrintWriter(wholeErr));
            whole.setUsageHelpWidth(100);
            whole.setExecutionExceptionHandler((ex, line, parse) -> {
                new PrintWriter(wholeErr, true).println("zbin: " + ex.getMessage());
                return Main.EXIT_USAGE;
            });
            int wholeRc = whole.execute(args);
            assertEquals(wholeRc, alone, String.join(" ", args));
            assertEquals(Main.EXIT_USAGE, alone, String.join(" ", args));
            assertEquals(wholeErr.toString(), aloneErr.toString(), String.join(" ", args));
        }
    }
}
