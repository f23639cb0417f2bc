package net.zbin.io.db;

import java.io.IOException;
import java.sql.Connection;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.sql.Timestamp;
import java.time.Instant;
import java.util.function.Consumer;
import net.zbin.core.CompensationSource;
import net.zbin.core.Reason;
import net.zbin.core.RecordedReading;
import net.zbin.core.Trigger;
import net.zbin.io.ReadingSource;
import net.zbin.io.StepsJson;

/**
 * A line's decisions from the historian's database as replay rows — a lot, a time range, or a lot within one —
 * in the order the line decided them, streamed through a server-side cursor (the driver fetches 5 000 rows at a time
 * inside one read-only transaction), so memory does not grow with the lot. The same rows as the lot's record file
 * give the same replay: the numbers are stored as the doubles the file held.
 */
public final class DbReadingSource implements ReadingSource {
    private final Connection c;
    private final PreparedStatement ps;
    private final ResultSet rs;
    private final Consumer<BadRow> bad;
    private final String what;
    private long n;

    /**
     * @param lot  the lot, or null: every lot in the range
     * @param from first instant (inclusive), or null
     * @param to   last instant (exclusive), or null
     */
    public DbReadingSource(Db.Login login, String line, String lot, Instant from, Instant to, Consumer<BadRow> bad) throws IOException {
        this.bad = bad;
        this.what = "line " + line + (lot == null ? "" : ", lot " + lot) + (from == null ? "" : ", from " + from) + (to == null ? "" : ", to " + to);
        try {
            c = Db.connect(login, "zbin-replay");
            c.setAutoCommit(false); // a cursor streams only inside a transaction
            c.setReadOnly(true);
            ps = c.prepareStatement("SELECT freq_hz, r_ohm, x_ohm, raw_r_ohm, raw_x_ohm, reason, attempt, comp, kind, seq, part, lot, readings, steps::text, source_line "
                    + "FROM decisions WHERE line = ? AND (?::text IS NULL OR lot = ?) AND (?::timestamptz IS NULL OR time >= ?) "
                    + "AND (?::timestamptz IS NULL OR time < ?) ORDER BY time, seq", ResultSet.TYPE_FORWARD_ONLY, ResultSet.CONCUR_READ_ONLY);
            ps.setFetchSize(5000);
            ps.setString(1, line);
            ps.setString(2, lot);
            ps.setString(3, lot);
            Timestamp f = from == null ? null : Timestamp.from(from), t = to == null ? null : Timestamp.from(to);
            ps.setTimestamp(4, f);
            ps.setTimestamp(5, f);
            ps.setTimestamp(6, t);
            ps.setTimestamp(7, t);
            rs = ps.executeQuery();
        } catch (SQLException e) {
            throw new IOException("database: " + e.getMessage().lines().findFirst().orElse(""), e);
        }
    }

    @Override
    public RecordedReading next() throws IOException {
        try {
            while (rs.next()) {
                n++;
                try {
                    return row();
                } catch (IllegalArgumentException e) {
                    bad.accept(new BadRow(rs.getLong(15), e.getMessage()));
                }
            }
            if (n == 0) throw new IOException("the database holds no decisions of " + what);
            return null;
        } catch (SQLException e) {
            throw new IOException("database: " + e.getMessage().lines().findFirst().orElse(""), e);
        }
    }

    private RecordedReading row() throws SQLException {
        String comp = rs.getString(8);
        long seq = rs.getLong(10);
        if (rs.wasNull()) seq = -1;
        int readings = rs.getInt(13);
        if (rs.wasNull()) readings = 1;
        String steps = rs.getString(14);
        // numbered as the row's line in its record file, so a replay from the database names the rows as one of the file does
        return new RecordedReading(rs.getLong(15), num(1), num(2), num(3), num(4), num(5), Reason.parse(rs.getString(6)), rs.getInt(7),
                comp == null || comp.isEmpty() ? CompensationSource.NONE : CompensationSource.parse(comp), Trigger.Kind.parse(rs.getString(9)), seq,
                rs.getString(11), rs.getString(12), readings, steps == null ? java.util.List.of() : StepsJson.decode(steps));
    }

    private double num(int i) throws SQLException {
        double v = rs.getDouble(i);
        return rs.wasNull() ? Double.NaN : v;
    }

    @Override
    public void close() throws IOException {
        try {
            c.rollback();
            c.close();
        } catch (SQLException e) {
            throw new IOException("database: " + e.getMessage(), e);
        }
    }
}
