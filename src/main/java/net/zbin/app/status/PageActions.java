package net.zbin.app.status;

/** What an operator may do from a line's page once signed in: pause, resume, acknowledge an alarm. */
@FunctionalInterface
public interface PageActions {
    /**
     * @param who    the signed-in operator (from the operators file, never from the request)
     * @param action pause, resume or acknowledge
     * @param alarm  the alarm's code for acknowledge, else null
     * @param note   the operator's note, may be null
     * @return what was done, shown to the operator
     * @throws Refused the line refused it (e.g. the alarm cleared meanwhile), with the reason
     */
    String act(String who, String action, String alarm, String note) throws Refused;

    final class Refused extends Exception {
        public Refused(String message) { super(message); }
    }
}
