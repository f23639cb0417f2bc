package net.zbin.sim;

/**
 * What sits on the meter's contacts now. The handler simulator (or a {@code SIM:} command) sets
 * it; the meter reads it. Thread-safe: the two sides run on different threads.
 */
public final class Contacts {
    /** What is presented. */
    public enum State { PART, OPEN, SHORT }

    /**
     * @param state        part, nothing, or a short bar
     * @param part         the part model when state is PART
     * @param intermittent probability that one reading of this part sees an open contact
     */
    public record Presented(State state, PartModel part, double intermittent) {
        public static final Presented NOTHING = new Presented(State.OPEN, null, 0);
    }

    private volatile Presented now = Presented.NOTHING;

    public void load(PartModel part, double intermittent) { now = new Presented(State.PART, part, intermittent); }

    public void open() { now = Presented.NOTHING; }

    public void shortBar() { now = new Presented(State.SHORT, null, 0); }

    public Presented now() { return now; }
}
