package net.zbin.app;

import java.io.PrintWriter;
import java.io.StringWriter;

/** Runs the real command line in-process and captures what it prints. */
public record Cli(int exit, String out, String err) {
    public static Cli run(String... args) {
        StringWriter o = new StringWriter(), e = new StringWriter();
        int rc = Main.execute(args, new PrintWriter(o), new PrintWriter(e));
        return new Cli(rc, o.toString(), e.toString());
    }
}
