package net.zbin.io.mqtt;

/** The topics of one line (contract, see the README's MQTT table): {@code <root>/<line>/<name>}. */
public record Topics(String root, String line) {
    public String base() { return root + "/" + line + "/"; }
    public String trigger() { return base() + "trigger"; }
    public String decision() { return base() + "decision"; }
    public String state() { return base() + "state"; }
    public String dashboard() { return base() + "dashboard"; }
    public String alarm() { return base() + "alarm"; }
    public String command() { return base() + "command"; }
    public String commandResult() { return base() + "command/result"; }
    public String rejected() { return base() + "rejected"; }
    /** The start's rehearsal: what the daemon sends itself before it says ready (the trigger's way in). */
    public String rehearsalAsk() { return base() + "rehearsal/ask"; }
    /** The start's rehearsal: the answer's way out, heard by the daemon itself. */
    public String rehearsalAnswer() { return base() + "rehearsal/answer"; }
}
