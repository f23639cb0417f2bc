package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import picocli.CommandLine;
import org.junit.jupiter.api.Test;

/** Every command's help prints cleanly (no picocli format warnings from a bare %), and the command list shows whole sentences. */
class HelpTextTest {
    static List<List<String>> commands(CommandLine cl, List<String> path) {
        List<List<String>> out = new ArrayList<>();
        out.add(path);
        for (var e : cl.getSubcommands().entrySet()) {
            if (e.getKey().equals("help")) continue;
            List<String> p = new ArrayList<>(path);
            p.add(e.getKey());
            out.addAll(commands(e.getValue(), p));
        }
        return out;
    }

    @Test
    void everyCommandsHelp_printsWithoutFormatWarnings() {
        java.io.PrintStream saved = System.err;
        java.io.ByteArrayOutputStream stderr = new java.io.ByteArrayOutputStream();
        System.setErr(new java.io.PrintStream(stderr, true)); // picocli prints its warnings to System.err
        try {
            for (List<String> path : commands(new CommandLine(new Main()), List.of())) {
                List<String> args = new ArrayList<>(path);
                args.add("--help");
                Cli c = Cli.run(args.toArray(String[]::new));
                assertEquals(0, c.exit(), String.join(" ", args));
                assertFalse((c.out() + c.err()).contains("Could not format"), String.join(" ", args) + ":\n" + c.err());
                assertFalse(c.out().contains("%n") || c.out().contains("%%"), String.join(" ", args) + " shows a raw format string:\n" + c.out());
            }
        } finally {
            System.setErr(saved);
        }
        assertFalse(stderr.toString().contains("Could not format"), stderr.toString());
    }

    @Test
    void theCommandLists_showEachCommandsFirstSentenceWhole() {
        for (String[] args : new String[][] {{"--help"}, {"sim", "--help"}}) {
            String out = Cli.run(args).out();
            List<String> entries = new ArrayList<>();
            boolean in = false;
            for (String line : out.split("\n")) {
                if (line.startsWith("Commands:")) {
                    in = true;
                    continue;
                }
                if (!in || line.isBlank()) continue;
                if (line.startsWith("  ") && !line.startsWith("   ")) entries.add(line.trim());
                else entries.set(entries.size() - 1, entries.get(entries.size() - 1) + " " + line.trim()); // a wrapped line
            }
            assertTrue(entries.size() >= 3, out);
            for (String e : entries) assertTrue(e.endsWith("."), "a whole sentence: " + e);
        }
    }
}
