package net.zbin.io.db;

import com.fasterxml.jackson.databind.JsonNode;
import java.io.ByteArrayInputStream;
import java.nio.charset.StandardCharsets;
import java.sql.Connection;
import java.sql.PreparedStatement;
import java.sql.SQLException;
import java.sql.Savepoint;
import java.sql.Statement;
import java.sql.Timestamp;
import java.time.Instant;
import java.time.LocalDate;
import java.util.ArrayList;
import java.util.List;
import java.util.Set;
import java.util.TreeSet;
import net.zbin.io.DecisionFields;
import net.zbin.io.Json;
import net.zbin.io.RecordColumns;
import org.postgresql.PGConnection;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * One batch of a followed file into the database, in one transaction with the batch's end position: the rows and the
 * position are committed together or not at all, and the unique key per presentation turns a batch read again after a
 * crash into no new rows. Record rows go in by COPY into a session-local staging table and one INSERT … SELECT from it
 * (the casts, the spreadsheet-safe text read back, ON CONFLICT DO NOTHING), at nearly the speed of COPY itself.
 */
public final class Ingest {
    private static final Logger LOG = LoggerFactory.getLogger(Ingest.class);
    private static final Set<String> NUMBERS = Set.of("freq_hz", "r_ohm", "x_ohm", "raw_r_ohm", "raw_x_ohm", "value", "dev_pct", "d", "q",
            "esr_ohm", "theta_deg", "latency_ms");
    private static final Set<String> INTEGERS = Set.of("bin", "attempt", "readings");

    private Ingest() {}

    /** What a batch did: rows stored (new), rows already there (a batch read again), rows that could not be stored. */
    public record Result(long stored, long already, long refused) {}

    /** The days (UTC) of the rows in a chunk of record lines: the partitions they need. */
    public static Set<LocalDate> days(byte[] chunk) {
        Set<LocalDate> out = new TreeSet<>();
        int i = 0;
        while (i < chunk.length) {
            if (chunk.length - i >= 10 && chunk[i] >= '0' && chunk[i] <= '9') {
                try {
                    out.add(LocalDate.parse(new String(chunk, i, 10, StandardCharsets.US_ASCII)));
                } catch (java.time.format.DateTimeParseException e) {
                    // not a row of this log: COPY refuses it below, with its line
                }
            }
            while (i < chunk.length && chunk[i] != '\n') i++;
            i++;
        }
        return out;
    }

    /**
     * @param header    the file's CSV header: the record log's columns, or a prefix of them (a file written before a
     *                  column was appended)
     * @param firstLine the file's line number (1 = the header) of the chunk's first line
     */
    public static Result records(Connection c, String line, String file, List<String> header, FileTail.Chunk chunk, long firstLine)
            throws SQLException, java.io.IOException {
        c.setAutoCommit(false);
        String cols = "source_file, source_line, " + String.join(", ", header);
        try (Statement s = c.createStatement()) {
            s.execute("CREATE TEMP TABLE IF NOT EXISTS staging_decisions (source_file text, source_line bigint, " + String.join(" text, ", RecordColumns.ALL)
                    + " text) ON COMMIT DELETE ROWS");
        }
        String insert = insertSql(header);
        long stored = -1, refused = 0;
        byte[] numbered = numbered(file, chunk.bytes(), firstLine);
        if (!escapedText(chunk.bytes())) {
            // the common case: straight into the table (COPY routes each row to its day), no staging; a row already
            // there (the position was lost, the same file read twice) makes the batch go the careful way below
            Savepoint direct = c.setSavepoint();
            try {
                long n = c.unwrap(PGConnection.class).getCopyAPI().copyIn("COPY decisions (" + cols + ") FROM STDIN WITH (FORMAT csv, FORCE_NOT_NULL ("
                        + String.join(", ", header.stream().filter(NOT_NULL_TEXT::contains).toList()) + "))", new ByteArrayInputStream(numbered));
                c.releaseSavepoint(direct);
                stored = n;
            } catch (SQLException e) {
                if (Db.transient_(e)) throw e;
                c.rollback(direct);
            }
        }
        if (stored >= 0) {
            position(c, line, file, chunk, firstLine);
            c.commit();
            return new Result(stored, 0, 0);
        }
        Savepoint all = c.setSavepoint();
        try {
            copy(c, cols, numbered);
            try (Statement s = c.createStatement()) {
                stored = s.executeUpdate(insert);
            }
            c.releaseSavepoint(all);
        } catch (SQLException e) {
            if (Db.transient_(e)) throw e;
            c.rollback(all);
            // a row the database refuses: store the others one by one, and name the one refused
            stored = 0;
            String[] rows = new String(chunk.bytes(), StandardCharsets.UTF_8).split("\n", -1);
            for (int k = 0; k < rows.length - 1; k++) {
                Savepoint one = c.setSavepoint();
                try {
                    copy(c, cols, numbered(file, (rows[k] + "\n").getBytes(StandardCharsets.UTF_8), firstLine + k));
                    try (Statement s = c.createStatement()) {
                        stored += s.executeUpdate(insert);
                        s.execute("TRUNCATE staging_decisions");
                    }
                    c.releaseSavepoint(one);
                } catch (SQLException r) {
                    if (Db.transient_(r)) throw r;
                    c.rollback(one);
                    refused++;
                    LOG.warn("{}:{}: row not stored: {}", file, firstLine + k, r.getMessage().lines().findFirst().orElse(""));
                }
            }
        }
        position(c, line, file, chunk, firstLine);
        c.commit();
        return new Result(stored, chunk.lines() - stored - refused, refused);
    }

    /** Text columns stored as '' rather than NULL when empty (the table's NOT NULL DEFAULT '' columns). */
    private static final Set<String> NOT_NULL_TEXT = Set.of("lot", "part", "recipe", "grade");

    /**
     * True when a cell starts with an apostrophe: a spreadsheet-safe escape (or an apostrophe of the text itself, doubled)
     * that must be read back before storing, which the staging table's INSERT does.
     */
    static boolean escapedText(byte[] rows) {
        for (int i = 1; i < rows.length; i++)
            if (rows[i] == '\'' && (rows[i - 1] == ',' || rows[i - 1] == '\n' || (rows[i - 1] == '"' && i > 1 && (rows[i - 2] == ',' || rows[i - 2] == '\n'))))
                return true;
        return rows.length > 0 && rows[0] == '\'';
    }

    /** The lines with the file's name and each line's number in front, as the staging table's first two columns. */
    static byte[] numbered(String file, byte[] rows, long firstLine) {
        byte[] name = ("\"" + file.replace("\"", "\"\"") + "\",").getBytes(StandardCharsets.UTF_8);
        java.io.ByteArrayOutputStream out = new java.io.ByteArrayOutputStream(rows.length + rows.length / 4);
        long n = firstLine;
        int start = 0;
        for (int i = 0; i < rows.length; i++) {
            if (rows[i] != '\n') continue;
            out.writeBytes(name);
            out.writeBytes((n++ + ",").getBytes(StandardCharsets.US_ASCII));
            out.write(rows, start, i + 1 - start);
            start = i + 1;
        }
        return out.toByteArray();
    }

    private static void copy(Connection c, String cols, byte[] rows) throws SQLException, java.io.IOException {
        c.unwrap(PGConnection.class).getCopyAPI().copyIn("COPY staging_decisions (" + cols + ") FROM STDIN WITH (FORMAT csv)",
                new ByteArrayInputStream(rows));
    }

    /** The INSERT … SELECT from the staging table: empty cells NULL, numbers cast, free text read back exactly. */
    static String insertSql(List<String> header) {
        List<String> to = new ArrayList<>(List.of("source_file", "source_line")), from = new ArrayList<>(List.of("source_file", "source_line"));
        for (String col : header) {
            to.add(col);
            String v;
            if (col.equals("time")) v = "time::timestamptz";
            else if (NUMBERS.contains(col)) v = "nullif(" + col + ", '')::double precision";
            else if (INTEGERS.contains(col)) v = "nullif(" + col + ", '')::integer";
            else if (col.equals("seq")) v = "nullif(seq, '')::bigint";
            else if (col.equals("steps")) v = "nullif(steps, '')::jsonb";
            else if (DecisionFields.TEXT_COLUMNS.contains(col)) v = "CASE WHEN left(" + col + ", 1) = '''' THEN substr(" + col + ", 2) ELSE coalesce(" + col + ", '') END";
            else v = "nullif(" + col + ", '')";
            from.add(v);
        }
        return "INSERT INTO decisions (" + String.join(", ", to) + ") SELECT " + String.join(", ", from)
                + " FROM staging_decisions ON CONFLICT DO NOTHING";
    }

    /** Binds one parsed history line to the INSERT's parameters 2.. (1 is the line; the last two the file and its line). */
    @FunctionalInterface
    private interface Binder {
        void bind(JsonNode a, PreparedStatement p) throws SQLException, java.io.IOException;
    }

    /**
     * One JSON object a line, each line an INSERT row; a line that is not such an object, or lacks what the row
     * needs, is logged with its file and line and skipped.
     */
    private static Result jsonLines(Connection c, String line, String file, FileTail.Chunk chunk, long firstLine, String what, String sql,
                                    int params, Binder binder) throws SQLException {
        c.setAutoCommit(false);
        long stored = 0, refused = 0;
        String[] rows = new String(chunk.bytes(), StandardCharsets.UTF_8).split("\n", -1);
        try (PreparedStatement p = c.prepareStatement(sql)) {
            for (int k = 0; k < rows.length - 1; k++) {
                try {
                    JsonNode a = Json.mapper().readTree(rows[k]);
                    if (a == null || !a.isObject()) throw new java.io.IOException("not a JSON object");
                    p.setString(1, line);
                    binder.bind(a, p);
                } catch (java.io.IOException | java.time.format.DateTimeParseException e) {
                    p.clearParameters();
                    refused++;
                    LOG.warn("{}:{}: {} line not stored: {}", file, firstLine + k, what, e.getMessage());
                    continue;
                }
                p.setString(params - 1, file);
                p.setLong(params, firstLine + k);
                p.addBatch();
            }
            for (int r : p.executeBatch()) if (r > 0) stored += r;
        }
        position(c, line, file, chunk, firstLine);
        c.commit();
        return new Result(stored, chunk.lines() - stored - refused, refused);
    }

    /** Alarm history lines (one JSON object each) as alarm events. */
    public static Result alarms(Connection c, String line, String file, FileTail.Chunk chunk, long firstLine) throws SQLException {
        return jsonLines(c, line, file, chunk, firstLine, "alarm", "INSERT INTO alarm_events (line, code, severity, active, message, since, ack_by, "
                + "ack_at, ack_note, source_file, source_line) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?) ON CONFLICT DO NOTHING", 11, (a, p) -> {
            if (!a.path("code").isTextual() || !a.path("since").isTextual()) throw new java.io.IOException("no code or since");
            JsonNode ack = a.path("acknowledged");
            p.setString(2, a.path("code").asText());
            p.setString(3, a.path("severity").asText(""));
            p.setBoolean(4, a.path("active").asBoolean(false));
            p.setString(5, a.path("message").asText(""));
            p.setTimestamp(6, Timestamp.from(Instant.parse(a.path("since").asText())));
            p.setString(7, ack.isObject() ? ack.path("by").asText() : null);
            p.setTimestamp(8, ack.isObject() && ack.path("at").isTextual() ? Timestamp.from(Instant.parse(ack.path("at").asText())) : null);
            p.setString(9, ack.isObject() ? ack.path("note").asText("") : null);
        });
    }

    /** Compensation capture lines (one JSON object each: at, kind, freq_hz, r_ohm, x_ohm) as capture rows. */
    public static Result captures(Connection c, String line, String file, FileTail.Chunk chunk, long firstLine) throws SQLException {
        return jsonLines(c, line, file, chunk, firstLine, "capture", "INSERT INTO compensation_captures (line, at, kind, freq_hz, r_ohm, x_ohm, "
                + "source_file, source_line) VALUES (?, ?, ?, ?, ?, ?, ?, ?) ON CONFLICT DO NOTHING", 8, (a, p) -> {
            if (!a.path("kind").isTextual() || !a.path("freq_hz").isNumber() || !a.path("r_ohm").isNumber() || !a.path("x_ohm").isNumber())
                throw new java.io.IOException("needs at, kind, freq_hz, r_ohm and x_ohm");
            p.setTimestamp(2, Timestamp.from(Instant.parse(a.path("at").asText())));
            p.setString(3, a.path("kind").asText());
            p.setDouble(4, a.path("freq_hz").asDouble());
            p.setDouble(5, a.path("r_ohm").asDouble());
            p.setDouble(6, a.path("x_ohm").asDouble());
        });
    }

    private static void position(Connection c, String line, String file, FileTail.Chunk chunk, long firstLine) throws SQLException {
        try (PreparedStatement p = c.prepareStatement("INSERT INTO ingest_batches (line, file, end_offset, end_line, rows) VALUES (?, ?, ?, ?, ?)")) {
            p.setString(1, line);
            p.setString(2, file);
            p.setLong(3, chunk.endOffset());
            p.setLong(4, firstLine + chunk.lines() - 1);
            p.setInt(5, chunk.lines());
            p.executeUpdate();
        }
    }

    /** Where each file of a line was committed up to: file → {end offset, end line}. */
    public static java.util.Map<String, long[]> positions(Connection c, String line) throws SQLException {
        java.util.Map<String, long[]> out = new java.util.HashMap<>();
        try (PreparedStatement p = c.prepareStatement("SELECT file, max(end_offset), max(end_line) FROM ingest_batches WHERE line = ? GROUP BY file")) {
            p.setString(1, line);
            try (var rs = p.executeQuery()) {
                while (rs.next()) out.put(rs.getString(1), new long[] {rs.getLong(2), rs.getLong(3)});
            }
        }
        if (!c.getAutoCommit()) c.commit();
        return out;
    }
}
