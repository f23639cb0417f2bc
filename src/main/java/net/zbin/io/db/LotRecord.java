package net.zbin.io.db;

import java.sql.Connection;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.sql.Timestamp;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;

/**
 * A lot (or a shift: a time range of a line) as the line recorded it, read from the historian's database: the final
 * decisions by bin and reason, retests, fixture checks, the deviation of the graded parts, the alarms raised and
 * acknowledged while it ran, and the compensation captures in force and taken during it. What was decided, not a
 * regrade.
 */
public record LotRecord(String line, String lot, Instant first, Instant last, List<String> recipes, List<Bin> bins, long retests,
                        long checksPassed, long checksFailed, long graded, double devMeanPct, double devSigmaPct, List<Alarm> alarms,
                        List<Capture> captures, List<Check> failedChecks) {
    public record Bin(int bin, String grade, String verdict, String reason, long parts) {}

    public record Alarm(String code, String severity, boolean active, Instant since, String message, String ackBy, Instant ackAt, String ackNote) {}

    public record Capture(Instant at, String kind, double freqHz, double rOhm, double xOhm) {}

    public record Check(Instant at, String kind, String reason, double rOhm, double xOhm) {}

    /** @param lot the lot, or null: every decision of the line in [from, to) */
    public static LotRecord read(Db.Login login, String line, String lot, Instant from, Instant to) throws SQLException {
        try (Connection c = Db.connect(login, "zbin-report")) {
            c.setReadOnly(true);
            String where = " WHERE line = ? AND (?::text IS NULL OR lot = ?) AND (?::timestamptz IS NULL OR time >= ?) AND (?::timestamptz IS NULL OR time < ?)";
            Instant first = null, last = null;
            List<String> recipes = new ArrayList<>();
            try (PreparedStatement p = c.prepareStatement("SELECT min(time), max(time), string_agg(DISTINCT recipe, ',') FROM decisions" + where)) {
                bind(p, line, lot, from, to);
                try (ResultSet rs = p.executeQuery()) {
                    rs.next();
                    first = instant(rs.getTimestamp(1));
                    last = instant(rs.getTimestamp(2));
                    if (rs.getString(3) != null) recipes.addAll(List.of(rs.getString(3).split(",")));
                }
            }
            if (first == null) throw new SQLException("the database holds no decisions of line " + line + (lot == null ? "" : ", lot " + lot)
                    + (from == null ? "" : " from " + from) + (to == null ? "" : " to " + to), "02000");
            List<Bin> bins = new ArrayList<>();
            long retests = 0, okChecks = 0, badChecks = 0;
            try (PreparedStatement p = c.prepareStatement("SELECT kind, bin, grade, verdict, reason, count(*) FROM decisions" + where
                    + " GROUP BY kind, bin, grade, verdict, reason ORDER BY kind, bin, grade, verdict, reason")) {
                bind(p, line, lot, from, to);
                try (ResultSet rs = p.executeQuery()) {
                    while (rs.next()) {
                        String kind = rs.getString(1), verdict = rs.getString(4);
                        long n = rs.getLong(6);
                        if (!kind.equals("part")) {
                            if (rs.getString(5).endsWith("-ok")) okChecks += n;
                            else badChecks += n;
                        } else if (verdict.equals("retest")) retests += n;
                        else bins.add(new Bin(rs.getInt(2), rs.getString(3), verdict, rs.getString(5), n));
                    }
                }
            }
            long graded;
            double mean, sigma;
            try (PreparedStatement p = c.prepareStatement("SELECT count(dev_pct), avg(dev_pct), stddev_samp(dev_pct) FROM decisions" + where
                    + " AND kind = 'part' AND verdict <> 'retest' AND dev_pct IS NOT NULL")) {
                bind(p, line, lot, from, to);
                try (ResultSet rs = p.executeQuery()) {
                    rs.next();
                    graded = rs.getLong(1);
                    mean = num(rs, 2);
                    sigma = num(rs, 3);
                }
            }
            List<Alarm> alarms = new ArrayList<>();
            // raised (or cleared: a clearing names when it was raised) or acknowledged while the lot ran, in the order the line wrote them
            try (PreparedStatement p = c.prepareStatement("SELECT code, severity, active, since, message, ack_by, ack_at, ack_note FROM alarm_events "
                    + "WHERE line = ? AND (since BETWEEN ? AND ? OR ack_at BETWEEN ? AND ?) ORDER BY source_file, source_line")) {
                p.setString(1, line);
                for (int i : new int[] {2, 4}) {
                    p.setTimestamp(i, Timestamp.from(first));
                    p.setTimestamp(i + 1, Timestamp.from(last));
                }
                try (ResultSet rs = p.executeQuery()) {
                    while (rs.next())
                        alarms.add(new Alarm(rs.getString(1), rs.getString(2), rs.getBoolean(3), instant(rs.getTimestamp(4)), rs.getString(5),
                                rs.getString(6), instant(rs.getTimestamp(7)), rs.getString(8)));
                }
            }
            List<Capture> caps = new ArrayList<>();
            try (PreparedStatement p = c.prepareStatement("(SELECT DISTINCT ON (kind, freq_hz) at, kind, freq_hz, r_ohm, x_ohm FROM compensation_captures "
                    + "WHERE line = ? AND at <= ? ORDER BY kind, freq_hz, at DESC) UNION ALL (SELECT at, kind, freq_hz, r_ohm, x_ohm FROM compensation_captures "
                    + "WHERE line = ? AND at > ? AND at <= ?) ORDER BY 1")) {
                p.setString(1, line);
                p.setTimestamp(2, Timestamp.from(first));
                p.setString(3, line);
                p.setTimestamp(4, Timestamp.from(first));
                p.setTimestamp(5, Timestamp.from(last));
                try (ResultSet rs = p.executeQuery()) {
                    while (rs.next()) caps.add(new Capture(instant(rs.getTimestamp(1)), rs.getString(2), rs.getDouble(3), rs.getDouble(4), rs.getDouble(5)));
                }
            }
            List<Check> failed = new ArrayList<>();
            try (PreparedStatement p = c.prepareStatement("SELECT time, kind, reason, r_ohm, x_ohm FROM decisions" + where
                    + " AND kind <> 'part' AND reason NOT LIKE '%-ok' ORDER BY time LIMIT 200")) {
                bind(p, line, lot, from, to);
                try (ResultSet rs = p.executeQuery()) {
                    while (rs.next()) failed.add(new Check(instant(rs.getTimestamp(1)), rs.getString(2), rs.getString(3), num(rs, 4), num(rs, 5)));
                }
            }
            return new LotRecord(line, lot, first, last, recipes, bins, retests, okChecks, badChecks, graded, mean, sigma, alarms, caps, failed);
        }
    }

    private static void bind(PreparedStatement p, String line, String lot, Instant from, Instant to) throws SQLException {
        p.setString(1, line);
        p.setString(2, lot);
        p.setString(3, lot);
        Timestamp f = from == null ? null : Timestamp.from(from), t = to == null ? null : Timestamp.from(to);
        p.setTimestamp(4, f);
        p.setTimestamp(5, f);
        p.setTimestamp(6, t);
        p.setTimestamp(7, t);
    }

    private static Instant instant(Timestamp t) { return t == null ? null : t.toInstant(); }

    private static double num(ResultSet rs, int i) throws SQLException {
        double v = rs.getDouble(i);
        return rs.wasNull() ? Double.NaN : v;
    }
}
