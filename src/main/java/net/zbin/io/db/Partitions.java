package net.zbin.io.db;

import java.sql.Connection;
import java.sql.SQLException;
import java.sql.Statement;
import java.time.LocalDate;
import java.time.format.DateTimeFormatter;
import java.util.ArrayList;
import java.util.List;

/**
 * The decisions table's day partitions (UTC): created before rows of a day arrive, dropped past the retention — a
 * dropped partition is gone in one catalogue change, with no row-by-row delete and no vacuum behind it. Run as the
 * owner role: the ingest role cannot create or drop tables.
 */
public final class Partitions {
    private Partitions() {}

    static final DateTimeFormatter DAY = DateTimeFormatter.BASIC_ISO_DATE;

    static String name(LocalDate day) { return "decisions_" + DAY.format(day); }

    /** Creates the partitions of these days where missing. */
    public static void ensure(Connection owner, Iterable<LocalDate> days) throws SQLException {
        try (Statement s = owner.createStatement()) {
            for (LocalDate d : days) {
                try {
                    s.execute("CREATE TABLE IF NOT EXISTS " + name(d) + " PARTITION OF decisions FOR VALUES FROM ('" + d + "') TO ('" + d.plusDays(1) + "')");
                } catch (SQLException e) {
                    // another historian made the same day's partition at the same moment: it is there, which is all we need
                    if (!"23505".equals(e.getSQLState()) && !"42P07".equals(e.getSQLState())) throw e;
                    if (!owner.getAutoCommit()) owner.rollback();
                }
            }
        }
        if (!owner.getAutoCommit()) owner.commit();
    }

    /** Drops the partitions of days before {@code keepFrom}; returns their names. */
    public static List<String> dropBefore(Connection owner, LocalDate keepFrom) throws SQLException {
        List<String> old = new ArrayList<>();
        try (Statement s = owner.createStatement();
             var rs = s.executeQuery("SELECT c.relname FROM pg_inherits i JOIN pg_class c ON c.oid = i.inhrelid "
                     + "JOIN pg_class p ON p.oid = i.inhparent WHERE p.relname = 'decisions'")) {
            while (rs.next()) {
                String n = rs.getString(1);
                if (!n.matches("decisions_\\d{8}")) continue;
                if (LocalDate.parse(n.substring(10), DAY).isBefore(keepFrom)) old.add(n);
            }
        }
        try (Statement s = owner.createStatement()) {
            for (String n : old) s.execute("DROP TABLE " + n);
        }
        if (!owner.getAutoCommit()) owner.commit();
        return old;
    }
}
