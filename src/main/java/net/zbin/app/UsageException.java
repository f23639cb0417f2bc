package net.zbin.app;

/** Bad input on the command line or in an input file that is not a configuration file: exit 2. */
public final class UsageException extends Exception {
    public UsageException(String message) { super(message); }
}
