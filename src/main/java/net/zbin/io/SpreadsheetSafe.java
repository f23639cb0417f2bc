package net.zbin.io;

/**
 * Text cells of the record log that a spreadsheet would evaluate as a formula (CSV injection, OWASP):
 * a cell that starts with {@code = + - @}, a tab or a carriage return gets a leading apostrophe, which
 * spreadsheets show as text. A cell that starts with an apostrophe gets one more, so {@link #read} gives the
 * exact original back for every text: the mapping is one to one. Only free-text columns (lot, part, recipe,
 * grade, line) pass through here; numbers are written as numbers.
 */
public final class SpreadsheetSafe {
    private SpreadsheetSafe() {}

    /** The cell as written to the file. */
    public static String write(String text) {
        if (text == null || text.isEmpty()) return text;
        char c = text.charAt(0);
        return c == '=' || c == '+' || c == '-' || c == '@' || c == '\t' || c == '\r' || c == '\'' ? "'" + text : text;
    }

    /** The original text of a cell read from the file. */
    public static String read(String cell) {
        return cell != null && cell.startsWith("'") ? cell.substring(1) : cell;
    }
}
